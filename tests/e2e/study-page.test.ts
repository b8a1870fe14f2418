import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { icosphere, writePly } from '../../shared/geometry'
import { openBrowser } from './support/browser'
import { Agent } from './support/http'
import { uploadLobe, waitForStudy } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

describe('in a real browser: the study result page', () => {
  let server: RunningServer
  let browser: Awaited<ReturnType<typeof openBrowser>>
  let studyId: number
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '200' })
    const analyst = new Agent(server.url)
    await analyst.signIn('analyst@example.org', 'isthmus-demo')
    const a = (await uploadLobe(analyst, writePly(icosphere(3, 1000), 'binary_little_endian'), 'a.ply', { density: '800', units: 'm' })).json
    const b = (await uploadLobe(analyst, writePly(icosphere(3, 700), 'binary_little_endian'), 'b.ply', { density: '800', units: 'm' })).json
    const prior = { kind: 'uniform', min: 400, max: 1200 }
    const res = await analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [1, 0, 0], orbit: { kind: 'parabolic' }, overlapDepth: 40, sweepSteps: 3, spread: { seed: 2, samples: 12, densityA: prior, densityB: prior, coneHalfAngleDeg: 10, scale: { kind: 'fixed', value: 1 }, neck: false } })
    studyId = (await waitForStudy(analyst, res.json.id)).id
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
    await expect.poll(() => page.getByTestId('spin-period').innerText()).toMatch(/no spin/)
    expect(await page.locator('main').innerText()).toContain('Priors: density of A uniform 400–1200 kg m⁻³')
  })
})
