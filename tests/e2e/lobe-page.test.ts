import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { boxMesh, icosphere, mergeMeshes, twoSphereBody, writeObj, writePly } from '#shared/geometry'
import { openBrowser, signInBrowser } from './support/browser'
import { Agent } from './support/http'
import { uploadLobe } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

// A regular octahedron with vertices at ±2 on each axis (km), faces wound outward. Each face
// centroid lies on a 3-fold symmetry axis, so gravity there is along the normal and the slope is 0
// (symmetry of the regular octahedron; common practice, no source).
const OCTAHEDRON = 'v 2 0 0\nv -2 0 0\nv 0 2 0\nv 0 -2 0\nv 0 0 2\nv 0 0 -2\n'
  + 'f 1 3 5\nf 3 2 5\nf 2 4 5\nf 4 1 5\nf 3 1 6\nf 2 3 6\nf 4 2 6\nf 1 4 6\n'

async function waitForSurface(agent: Agent, id: number, timeoutMs = 60_000) {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const lobe = (await agent.get(`/api/lobes/${id}`)).json
    if (lobe.properties.gravityJob?.status === 'done') return lobe
    if (Date.now() > deadline) throw new Error(`surface job still ${lobe.properties.gravityJob?.status}`)
    await new Promise(r => setTimeout(r, 200))
  }
}

describe('the lobe pages in a real browser: cautions, round-off, errors where they belong, a confirmed split', () => {
  let server: RunningServer
  let browser: Awaited<ReturnType<typeof openBrowser>>
  let analyst: Agent
  let pair: { first: any, second: any }
  let ball: any
  let octahedron: any

  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '200' })
    analyst = new Agent(server.url)
    await analyst.signIn('analyst@example.org', 'isthmus-demo')
    // Two 400 m spheres 1.2 km apart in a file in metres, read (twice) as kilometres.
    const twoBalls = writePly(mergeMeshes([icosphere(2, 400), icosphere(2, 400, [1200, 0, 0])]), 'binary_little_endian', { double: true })
    const first = await uploadLobe(analyst, twoBalls, 'two-balls.ply', { density: '600', units: 'km', name: 'two balls' })
    const second = await uploadLobe(analyst, twoBalls, 'two-balls.ply', { density: '900', units: 'km', name: 'two balls again' })
    expect(first.status, first.text).toBe(201)
    expect(second.status, second.text).toBe(201)
    pair = { first: first.json, second: second.json }
    ball = (await uploadLobe(analyst, writeObj(icosphere(2, 1)), 'ball.obj', { density: '1000', units: 'km' })).json
    octahedron = (await uploadLobe(analyst, new TextEncoder().encode(OCTAHEDRON), 'octahedron.obj', { density: '1000', units: 'km' })).json
    browser = await openBrowser()
    await signInBrowser(browser.context, server.url)
  })
  afterAll(async () => {
    await browser?.close()
    await server?.dispose()
  })

  async function open(path: string): Promise<Page> {
    const page = await browser.context.newPage()
    await page.goto(`${server.url}${path}`)
    return page
  }

  it('shows a two-body mesh read in the wrong units and uploaded twice with three cautions, and flags it in the list', async () => {
    const page = await open(`/lobes/${pair.second.id}`)
    const bodies = page.getByTestId('caution-multiple-components')
    await expect.poll(() => bodies.innerText()).toContain('This mesh holds 2 separate bodies.')
    expect(await bodies.innerText()).toMatch(/treat them as one rigid body.*splitting them into separate lobes/s)
    // and each body's own volume, mass and centre of mass
    expect(await page.getByTestId('component-values').innerText()).toMatch(/body 1: volume .* m³, mass .* kg, centre of mass \(.*\) m\s+body 2: /)
    const size = await page.getByTestId('caution-size-check').innerText()
    expect(size).toContain('Check the coordinate units.')
    expect(size).toContain('were the coordinates in metres?')
    const same = page.getByTestId('caution-same-file')
    expect(await same.innerText()).toContain(`the same file as lobe #${pair.first.id} 'two balls'`)
    expect(await same.getByRole('link', { name: `lobe #${pair.first.id}` }).getAttribute('href')).toBe(`/lobes/${pair.first.id}`)
    // The cautions come before the numbers they qualify.
    const cautionY = (await page.getByTestId('lobe-cautions').boundingBox())!.y
    expect(cautionY).toBeLessThan((await page.getByTestId('lobe-properties').boundingBox())!.y)
    await page.screenshot({ path: 'test-results/lobe-cautions.png', fullPage: true })

    await page.goto(`${server.url}/lobes?q=two%20balls`)
    const row = page.getByRole('row').filter({ hasText: 'two balls again' })
    const flag = row.getByTestId('bodies-flag')
    await expect.poll(() => flag.innerText()).toBe('2 bodies')
    expect(await flag.getAttribute('title')).toMatch(/2 separate bodies; its values treat them as one rigid body/)
    expect(await row.getByTestId('size-flag').getAttribute('title')).toContain('were the coordinates in metres?')
    // A one-body lobe has no flag.
    await page.goto(`${server.url}/lobes?q=ball`)
    await expect.poll(() => page.getByRole('row').filter({ hasText: 'ball.obj' }).count()).toBe(1)
    expect(await page.getByRole('row').filter({ hasText: 'ball.obj' }).getByTestId('bodies-flag').count()).toBe(0)
    await page.close()
  })

  it('shows round-off coefficients as 0 with the computed value on hover, and says which principal axes equal moments leave undefined', async () => {
    // The API keeps the raw values: a J2 of ~1e-16 and three moments equal to round-off.
    expect(ball.properties.J2).not.toBe(0)
    expect(Math.abs(ball.properties.J2)).toBeLessThan(1e-12)
    const page = await open(`/lobes/${ball.id}`)
    const j2 = page.locator('[data-key="J2"]')
    await expect.poll(() => j2.innerText()).toBe('0 (round-off)')
    expect(await j2.locator('[title]').getAttribute('title')).toMatch(/^Computed -?\d(\.\d+)?×10⁻¹⁶/)
    const note = page.getByTestId('degenerate-moments')
    expect(await note.innerText()).toContain('All three principal moments agree to a relative 10⁻⁹ (degenerate moments): no principal axes are defined')
    expect(await page.locator('[data-key="principalAxes"]').innerText()).toMatch(/A: not defined\s+B: not defined\s+C: not defined/)
    // The view's "look along" buttons say so too.
    const plusA = page.getByTestId('look-along').getByRole('button', { name: /^Look along \+A/ })
    await expect.poll(() => plusA.count(), { timeout: 30_000 }).toBe(1)
    expect(await plusA.getAttribute('title')).toContain('not defined, all three principal moments agree (degenerate moments)')
    await page.close()

    const done = await waitForSurface(analyst, octahedron.id)
    // acos of a cosine one float64 step below 1: a slope of ~1e-6° that is really 0.
    expect(done.properties.slopeDeg.max).toBeGreaterThan(0)
    expect(done.properties.slopeDeg.max).toBeLessThan(1e-5)
    const oct = await open(`/lobes/${octahedron.id}`)
    const slope = oct.locator('[data-key="slopeDeg"]')
    await expect.poll(() => slope.innerText()).toBe('0 (0 – 0) (round-off)')
    expect(await slope.locator('[title]').getAttribute('title')).toMatch(/values below 10⁻⁴° are round-off/)
    await oct.close()
  })

  it('styles a bad density as an error in the Assumptions card, and shows a refused delete beside the Delete button', async () => {
    const brick = (await uploadLobe(analyst, writeObj(boxMesh(1.2, 0.9, 0.7)), 'brick.obj', { density: '2100', units: 'km' })).json
    const rec = await analyst.post('/api/objects', { designation: 'ZZ-PAGE-DELETE', name: 'Delete placement', lobes: [brick.id] })
    expect(rec.status, rec.text).toBe(201)
    const page = await open(`/lobes/${brick.id}`)
    await page.getByLabel('Density (kg m⁻³)').fill('0')
    await page.getByRole('button', { name: 'Re-derive' }).click()
    const bad = page.getByTestId('assumptions-error')
    await expect.poll(() => bad.innerText()).toMatch(/^Bulk density: must be a number from 1 to 10 000 kg m⁻³/)
    expect(await bad.getAttribute('role')).toBe('alert')
    expect(await bad.getAttribute('class')).toContain('error-box')
    expect(await bad.evaluate(el => getComputedStyle(el).color)).not.toBe('rgb(0, 0, 0)')
    await page.getByLabel('Spin period (h)').fill('fast')
    await page.getByLabel('Density (kg m⁻³)').fill('2100')
    await page.getByRole('button', { name: 'Re-derive' }).click()
    await expect.poll(() => bad.innerText()).toMatch(/^Spin period: must be a positive number of hours/)

    page.once('dialog', d => void d.accept())
    const button = page.getByRole('button', { name: 'Delete this lobe' })
    await button.click()
    const refused = page.getByTestId('delete-error')
    await expect.poll(() => refused.innerText()).toContain('cited by an object record; it cannot be deleted')
    const b = (await button.boundingBox())!
    const r = (await refused.boundingBox())!
    expect(r.y - (b.y + b.height)).toBeGreaterThanOrEqual(0)
    expect(r.y - (b.y + b.height)).toBeLessThan(40)
    // Not in the Assumptions card any more.
    expect(await page.getByRole('heading', { name: 'Assumptions' }).locator('..').innerText()).not.toContain('cannot be deleted')
    await page.close()
  })

  it('names the upload form fields by their labels in its errors, and notes the units check beside the units', async () => {
    const page = await open('/lobes')
    expect(await page.getByTestId('units-hint').innerText()).toMatch(/1 000× too large.*outside 1 m – 300 km/s)
    await page.getByTestId('lobe-file').setInputFiles({ name: 'cube.obj', mimeType: 'text/plain', buffer: Buffer.from(writeObj(boxMesh(1, 1, 1))) })
    await page.getByLabel('Bulk density (kg m⁻³)').fill('0')
    await page.getByRole('button', { name: 'Upload and analyse' }).click()
    const alert = page.getByRole('alert').filter({ hasText: 'Check the fields' })
    await expect.poll(() => alert.innerText()).toContain('Bulk density: must be at least 1 kg m⁻³')
    // (the field's name never starts a line: "density: …" was what the form showed before)
    expect(await alert.innerText()).not.toMatch(/^density:/m)
    await page.close()
  })

  it('asks before splitting, stating what it creates, and each part says which lobe it was cut from', async () => {
    // Two overlapping spheres (1 km and 0.6 km, centres 1.4 km apart) as one body.
    const body = twoSphereBody(1, 0.6, 1.4, 48)
    const whole = (await uploadLobe(analyst, writePly(body, 'binary_little_endian', { double: true }), 'peanut.ply', { density: '700', units: 'km', name: 'peanut' })).json
    const before = (await analyst.get('/api/lobes?limit=1')).json.total
    const page = await open(`/lobes/${whole.id}`)
    await page.getByRole('button', { name: 'Split at the neck…' }).click()
    const confirm = page.getByTestId('split-confirm')
    const text = await confirm.innerText()
    expect(text).toContain('This creates two new lobes, peanut — part A and peanut — part B')
    expect(text).toContain('700 kg m⁻³')
    expect(text).toMatch(/flat,\s+synthetic face/)
    await confirm.getByRole('button', { name: 'Cancel' }).click()
    expect(await confirm.count()).toBe(0)
    expect((await analyst.get('/api/lobes?limit=1')).json.total).toBe(before)

    await page.getByRole('button', { name: 'Split at the neck…' }).click()
    await page.getByRole('button', { name: 'Create the two lobes' }).click()
    await page.waitForURL(url => /\/lobes\/\d+$/.test(url.pathname) && url.pathname !== `/lobes/${whole.id}`, { timeout: 60_000 })
    expect((await analyst.get('/api/lobes?limit=1')).json.total).toBe(before + 2)
    const origin = page.getByTestId('lobe-origin')
    await expect.poll(() => origin.innerText()).toContain(`Cut from lobe #${whole.id} 'peanut'`)
    expect(await origin.getByRole('link', { name: `lobe #${whole.id}` }).getAttribute('href')).toBe(`/lobes/${whole.id}`)
    expect(await page.getByTestId('report-origin').innerText()).toMatch(/not uploaded.*synthetic flat face/s)
    const report = await page.getByRole('heading', { name: 'Validation report' }).locator('..').innerText()
    expect(report).not.toContain('nothing was repaired')
    expect(report).not.toContain('as uploaded')
    expect(report).toContain('cut-face')
    await page.close()
  })
})
