import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { icosphere, writePly } from '#shared/geometry'
import { openBrowser, signInBrowser } from './support/browser'
import { Agent } from './support/http'
import { uploadLobe, waitForStudy } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

describe('in a real browser: the study result page', () => {
  let server: RunningServer
  let browser: Awaited<ReturnType<typeof openBrowser>>
  let studyId: number
  let missId: number
  let offId: number
  let tensionId: number
  let lobeIds: [number, number]
  let masses: number
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '200' })
    const analyst = new Agent(server.url)
    await analyst.signIn('analyst@example.org', 'isthmus-demo')
    const a = (await uploadLobe(analyst, writePly(icosphere(3, 1000), 'binary_little_endian'), 'a.ply', { density: '800', units: 'm' })).json
    const b = (await uploadLobe(analyst, writePly(icosphere(3, 700), 'binary_little_endian'), 'b.ply', { density: '800', units: 'm' })).json
    const prior = { kind: 'uniform', min: 400, max: 1200 }
    const res = await analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [1, 0, 0], orbit: { kind: 'parabolic' }, overlapDepth: 40, sweepSteps: 3, spread: { seed: 2, samples: 12, densityA: prior, densityB: prior, coneHalfAngleDeg: 10, scale: { kind: 'fixed', value: 1 }, neck: false } })
    studyId = (await waitForStudy(analyst, res.json.id)).id
    // A bound orbit whose pericentre (5 km) is far beyond the 1.7 km contact separation, with a spread asked for.
    const miss = await analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [0, 1, 0], orbit: { kind: 'bound', semiMajorAxis: 10_000, eccentricity: 0.5 }, spread: { seed: 1, samples: 4, densityA: prior, densityB: prior, coneHalfAngleDeg: 0, scale: { kind: 'fixed', value: 1 } } })
    missId = (await waitForStudy(analyst, miss.json.id)).id
    // A spread over 1500–2500 kg m⁻³ while the nominal run uses 800: every sample is faster than the nominal.
    const off = await analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [0, 0, 1], orbit: { kind: 'parabolic' }, sweepSteps: 0, spread: { seed: 5, samples: 8, densityA: { kind: 'uniform', min: 1500, max: 2500 }, densityB: { kind: 'uniform', min: 1500, max: 2500 }, coneHalfAngleDeg: 0, scale: { kind: 'fixed', value: 1 }, neck: false } })
    offId = (await waitForStudy(analyst, off.json.id)).id
    // A near-grazing parabolic approach (q = 1650 m against d ≈ 1700 m) with lobes synchronous with the
    // orbit: the merged body spins at about √(2q/d) ≈ 1.4 × the Keplerian rate at contact, so the lobes pull apart.
    const tension = await analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [1, 0, 0], orbit: { kind: 'parabolic', pericentre: 1650 }, overlapDepth: 40, sweepSteps: 0 })
    tensionId = (await waitForStudy(analyst, tension.json.id)).id
    lobeIds = [a.id, b.id]
    masses = a.properties.mass + b.properties.mass
    browser = await openBrowser()
  })
  afterAll(async () => {
    await browser?.close()
    await server?.dispose()
  })

  it('draws the neck-sweep and spread plots, and says plainly that a head-on merger does not spin', async () => {
    const page = await browser.context.newPage()
    await page.goto(`${server.url}/sign-in`)
    await page.getByLabel('E-mail').fill('viewer@example.org')
    await page.getByLabel('Password').fill('isthmus-demo')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.waitForURL(`${server.url}/`)
    await page.goto(`${server.url}/studies/${studyId}`)
    const charts = page.locator('canvas[role=img]')
    await expect.poll(() => charts.count()).toBe(2)
    // A drawn chart has been sized by chart.js (not the 300 × 150 canvas default) and has ink on it.
    for (let i = 0; i < 2; i++) {
      await expect.poll(() => charts.nth(i).evaluate((c: HTMLCanvasElement) => c.width)).not.toBe(300)
      const ink = await charts.nth(i).evaluate((c: HTMLCanvasElement) => {
        const d = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data
        let n = 0
        for (let k = 3; k < d.length; k += 4) if (d[k]! > 0) n++
        return n / (c.width * c.height)
      })
      expect(ink).toBeGreaterThan(0.01)
    }
    // The scatter's x axis covers every sample's density (chart.js reads the range from sorted data).
    const densities = (await (await page.request.get(`${server.url}/api/studies/${studyId}`)).json()).result.spread.sampleValues.map((s: { densityA: number }) => s.densityA)
    const [xMin, xMax] = await charts.nth(1).evaluate((c: HTMLCanvasElement) => [Number(c.dataset.xMin), Number(c.dataset.xMax)])
    expect(xMin).toBeLessThanOrEqual(Math.min(...densities))
    expect(xMax).toBeGreaterThanOrEqual(Math.max(...densities))
    // the nominal run and the chosen settling depth are marked beside the samples and the sweep
    expect(await charts.nth(1).evaluate((c: HTMLCanvasElement) => c.dataset.series)).toBe('Contact speed vs density of A|Nominal run')
    expect(await charts.nth(0).evaluate((c: HTMLCanvasElement) => c.dataset.series)).toBe('Neck equivalent radius|Chosen settling depth')
    await expect.poll(() => page.getByTestId('spin-period').innerText()).toMatch(/no spin/)
    expect(await page.locator('main').innerText()).toContain('Priors: density of A uniform 400–1200 kg m⁻³')
    // The inputs as run, each with its unit.
    const inputs = page.getByTestId('study-inputs')
    const unitOf = (id: string) => page.getByTestId(id).locator('xpath=following-sibling::td').innerText()
    expect(await page.getByTestId('input-overlap-depth').innerText()).toBe('40 (= 0.04 km)')
    expect(await unitOf('input-overlap-depth')).toBe('m')
    expect(await page.getByTestId('input-density-a').innerText()).toBe('800')
    expect(await unitOf('input-density-a')).toBe('kg m⁻³')
    expect(await page.getByTestId('input-spread-density-b').innerText()).toBe('uniform 400 – 1200')
    expect(await unitOf('input-spread-density-b')).toBe('kg m⁻³')
    const inputsText = await inputs.innerText()
    for (const label of ['Line of centres A → B', 'Orbit normal', 'Mutual orbit', 'Pericentre q', 'Spin of lobe A', 'Spin of lobe B', 'Orientation of B', 'Spread: approach cone half-angle', 'Spread: seed', 'Pathway screen']) expect(inputsText).toContain(label)

    // The separation period follows from the d shown beside it: d = first-contact separation − 40 m
    // settling, P = 2π√(d³/(GM)) (Kepler's third law, docs/contact-and-kinematics.md), in hours with "h" in the unit column.
    const result = (await (await page.request.get(`${server.url}/api/studies/${studyId}`)).json()).result
    const d = Number(await page.getByTestId('settled-separation').innerText())
    expect(d / (result.contact.separation - 40)).toBeCloseTo(1, 4)
    const G = 6.67430e-11 // CODATA 2018
    const period = page.getByTestId('separation-period')
    expect(Number(await period.innerText()) / (2 * Math.PI * Math.sqrt(d ** 3 / (G * masses)) / 3600)).toBeCloseTo(1, 2)
    expect(await period.locator('xpath=following-sibling::td').innerText()).toBe('h')

    // On a phone the result tables stay inside their cards (they scroll there if need be).
    await page.setViewportSize({ width: 390, height: 844 })
    const overflow = await page.locator('section.panel').evaluateAll(els => els.map(e => e.getBoundingClientRect().right).filter(r => r > window.innerWidth + 0.5))
    expect(overflow).toEqual([])
    await page.close()
  })

  it('says once, plainly, when the lobes miss; lists no contact marks; marks the study "no contact" in the list', async () => {
    const page = await browser.context.newPage()
    await page.goto(`${server.url}/studies/${missId}`)
    const text = await page.getByTestId('no-contact').innerText()
    expect(text).toMatch(/pericentre q = 5000 m is beyond the contact separation/)
    expect(text.match(/without touching|never touch/g)).toHaveLength(1)
    expect(text).toContain('spread over uncertain inputs was not run')
    const legend = await page.getByTestId('joined-legend').innerText()
    expect(legend).toContain('Lobe A')
    for (const mark of ['First-contact point', 'Neck outline', 'Centroid of the merged body', 'Principal axes']) expect(legend).not.toContain(mark)
    await page.goto(`${server.url}/studies`)
    expect(await page.getByTestId(`study-state-${missId}`).innerText()).toBe('no contact')
    expect(await page.getByTestId(`study-state-${studyId}`).innerText()).toBe('done')
    await page.close()
  })

  it('cautions beside the spread when the nominal value lies outside it', async () => {
    const page = await browser.context.newPage()
    const res = (await (await page.request.get(`${server.url}/api/studies/${offId}`)).json()).result
    // v ∝ √ρ at fixed geometry (vis-viva, docs/contact-and-kinematics.md): at ≥ 1500 kg m⁻³ every sample beats the 800 kg m⁻³ run.
    expect(res.spread.speed.min).toBeGreaterThan(res.contact.speed)
    await page.goto(`${server.url}/studies/${offId}`)
    const note = await page.getByTestId('spread-speed-note').innerText()
    expect(note).toMatch(/lies outside the spread's range \[[^\]]+\] m s⁻¹ \(below every sample\)/)
    expect(note).toContain('not centred on the nominal value')
    expect(await page.getByTestId('spread-escapeSpeed-note').innerText()).toContain('below every sample')
    // The study whose priors span the nominal densities contains the nominal speed: no "outside" caution there.
    await page.goto(`${server.url}/studies/${studyId}`)
    const nominal = (await (await page.request.get(`${server.url}/api/studies/${studyId}`)).json()).result
    const inside = nominal.spread.speed.min <= nominal.contact.speed && nominal.contact.speed <= nominal.spread.speed.max
    expect(inside).toBe(true)
    const notes = page.getByTestId('spread-speed-note')
    if (await notes.count()) expect(await notes.innerText()).not.toContain('outside the spread')
    await page.close()
  })

  it('explains a neck in tension: the stress in Pa, the cohesion it needs, the point-mass model', async () => {
    const page = await browser.context.newPage()
    const m = (await (await page.request.get(`${server.url}/api/studies/${tensionId}`)).json()).result.merged
    expect(m.neckStress).toBeGreaterThan(0)
    expect(m.spinPeriod).toBeLessThan(m.separationSpinPeriod)
    await page.goto(`${server.url}/studies/${tensionId}`)
    const text = await page.getByTestId('neck-tension').innerText()
    expect(text).toMatch(/^Neck in tension/)
    expect(text).toContain(`${Number(m.neckStress.toPrecision(5))} Pa`)
    expect(text).toContain('the lobes would separate at this spin')
    expect(text).toContain('point masses at their centroids')
    // The head-on study does not spin: no tension caution there.
    await page.goto(`${server.url}/studies/${studyId}`)
    await expect.poll(() => page.getByTestId('spin-period').innerText()).toMatch(/no spin/)
    expect(await page.getByTestId('neck-tension').count()).toBe(0)
    await page.close()
  })

  it('does not offer a lobe against itself; follows the lobes with the spread\'s density range; shows units and where defaults come from', async () => {
    await signInBrowser(browser.context, server.url)
    const page = await browser.context.newPage()
    await page.goto(`${server.url}/studies/new?lobeA=${lobeIds[0]}&lobeB=${lobeIds[1]}`)
    // Lobe A's choice is not offered as B (and B's not as A).
    const disabled = (side: string) => page.locator(`#lobe-${side} option`).evaluateAll(os => (os as HTMLOptionElement[]).filter(o => o.disabled && /^\d+$/.test(o.value)).map(o => Number(o.value)))
    await expect.poll(() => disabled('B')).toEqual([lobeIds[0]])
    expect(await disabled('A')).toEqual([lobeIds[1]])
    // Units in the labels.
    await page.getByLabel('Kind').selectOption('bound')
    for (const label of ['Semi-major axis a (km)', 'Eccentricity e (dimensionless', 'Settling depth after touching (m, not km', 'Neck sweep steps (count', 'Observed spin period (h, hours']) {
      expect(await page.getByText(label).count(), label).toBe(1)
    }
    expect(await page.getByTestId('hint-semi-major-axis').innerText()).toMatch(/Default: 4 × the sum of the lobes' largest centroid-to-vertex distances \(4 × 1\.7 km\)/)
    expect(await page.getByTestId('hint-overlap-depth').innerText()).toMatch(/Default: 2 % of the smaller lobe's volume-equivalent radius/)
    // Both lobes at 800 kg m⁻³: the spread's density range is 0.6 × 800 = 480 to 1.4 × 800 = 1120, not a fixed 300–1200.
    await page.getByLabel('Spread over uncertain inputs').check()
    await expect.poll(() => page.locator('input[name=densityMin]').inputValue()).toBe('480')
    expect(await page.locator('input[name=densityMax]').inputValue()).toBe('1120')
    expect(await page.getByTestId('hint-density-range').innerText()).toContain('(800 and 800 kg m⁻³)')
    expect(await page.getByTestId('density-range-warning').count()).toBe(0)
    // A study density of 1500 for A moves the range with it (0.6 × 800 = 480 to 1.4 × 1500 = 2100).
    await page.locator('input[name=densityA]').fill('1500')
    await expect.poll(() => page.locator('input[name=densityMax]').inputValue()).toBe('2100')
    expect(await page.locator('input[name=densityMin]').inputValue()).toBe('480')
    // A range edited to exclude a nominal density is flagged.
    await page.locator('input[name=densityMax]').fill('1000')
    await expect.poll(() => page.getByTestId('density-range-warning').innerText()).toMatch(/density of A \(1500 kg m⁻³\) lies outside the spread's range 480–1000 kg m⁻³/)
    // The same lobe on both sides (from a link): said at once, and the study cannot be run.
    await page.goto(`${server.url}/studies/new?lobeA=${lobeIds[0]}&lobeB=${lobeIds[0]}`)
    await expect.poll(() => page.getByTestId('same-lobe').count()).toBe(1)
    expect(await page.getByRole('button', { name: 'Run the study' }).isDisabled()).toBe(true)
    await page.close()
  })

  it('warns in the New study form when the orbit surely misses, and defaults a bound orbit to one that touches', async () => {
    await signInBrowser(browser.context, server.url)
    const page = await browser.context.newPage()
    await page.goto(`${server.url}/studies/new?lobeA=${lobeIds[0]}&lobeB=${lobeIds[1]}`)
    await page.getByLabel('Kind').selectOption('bound')
    // Default a = 4 × (1000 + 700) m, q = ½ (R_eq,A + R_eq,B) < d: no warning.
    await expect.poll(() => page.getByTestId('orbit-pericentre').innerText()).toMatch(/Pericentre q = 0\.8\d* km/)
    expect(await page.getByTestId('contact-warning').count()).toBe(0)
    await page.getByLabel('Eccentricity').fill('0')
    // q = a = 6.8 km > 1.7 km, the sum of the largest radii: the lobes cannot touch.
    await expect.poll(() => page.getByTestId('contact-warning').innerText()).toMatch(/cannot touch/)
    await page.close()
  })
})
