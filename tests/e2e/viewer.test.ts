import { existsSync, readFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { icosphere, writePly } from '#shared/geometry'
import { openBrowser, signInBrowser } from './support/browser'
import { Agent } from './support/http'
import { uploadLobe, waitForStudy } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

const G = 6.67430e-11 // CODATA 2018
const BACKGROUND = [0x0e, 0x10, 0x14] // basalt-950, the viewer's clear colour

interface Analysis { width: number, height: number, body: number, blue: number, orange: number, grey: number, blueX: number, blueY: number, orangeX: number }

/**
 * Pixel statistics of a PNG, decoded in the page (no PNG package needed): pixels differing from the
 * background, and how many look sky-blue (lobe B), orange (lobe A) or neutral grey (union).
 */
async function analyse(page: Page, png: Buffer): Promise<Analysis> {
  return page.evaluate(async ({ b64, bg }) => {
    const bytes = Uint8Array.from(atob(b64), ch => ch.charCodeAt(0))
    const img = await createImageBitmap(new Blob([bytes], { type: 'image/png' }))
    const c = new OffscreenCanvas(img.width, img.height)
    const g = c.getContext('2d')!
    g.drawImage(img, 0, 0)
    const d = g.getImageData(0, 0, img.width, img.height).data
    let body = 0, blue = 0, orange = 0, grey = 0, blueX = 0, blueY = 0, orangeX = 0
    for (let i = 0; i < d.length; i += 4) {
      const r = d[i], gr = d[i + 1], b = d[i + 2]
      if (Math.max(Math.abs(r - bg[0]), Math.abs(gr - bg[1]), Math.abs(b - bg[2])) <= 24) continue
      body++
      if (b > r + 20) {
        blue++
        blueX += (i / 4) % img.width
        blueY += Math.floor(i / 4 / img.width)
      }
      else if (r > b + 20) {
        orange++
        orangeX += (i / 4) % img.width
      }
      else grey++
    }
    return { width: img.width, height: img.height, body, blue, orange, grey, blueX: blue ? blueX / blue : 0, blueY: blue ? blueY / blue : 0, orangeX: orange ? orangeX / orange : 0 }
  }, { b64: png.toString('base64'), bg: BACKGROUND })
}

/** Fraction of pixels that differ (any channel by more than 24) between two same-size PNGs. */
async function changedFraction(page: Page, a: Buffer, b: Buffer): Promise<number> {
  return page.evaluate(async ({ a64, b64 }) => {
    const read = async (s: string) => {
      const img = await createImageBitmap(new Blob([Uint8Array.from(atob(s), ch => ch.charCodeAt(0))], { type: 'image/png' }))
      const c = new OffscreenCanvas(img.width, img.height)
      const g = c.getContext('2d')!
      g.drawImage(img, 0, 0)
      return g.getImageData(0, 0, img.width, img.height).data
    }
    const [x, y] = await Promise.all([read(a64), read(b64)])
    let n = 0
    for (let i = 0; i < x.length; i += 4) if (Math.max(Math.abs(x[i] - y[i]), Math.abs(x[i + 1] - y[i + 1]), Math.abs(x[i + 2] - y[i + 2])) > 24) n++
    return n / (x.length / 4)
  }, { a64: a.toString('base64'), b64: b.toString('base64') })
}

async function frames(page: Page): Promise<number> {
  return Number(await page.getByTestId('viewer-canvas').getAttribute('data-frames'))
}

/** Waits until the viewer has drawn at least one more frame than `after` and settles. */
async function settled(page: Page, after: number) {
  await expect.poll(() => frames(page), { timeout: 10_000 }).toBeGreaterThan(after)
  await page.waitForTimeout(150)
}

describe('the 3D views in a real browser (software WebGL)', () => {
  let server: RunningServer
  let browser: Awaited<ReturnType<typeof openBrowser>>
  const analyst = {} as Agent
  let ball: any

  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '300' })
    Object.assign(analyst, new Agent(server.url))
    Object.setPrototypeOf(analyst, Agent.prototype)
    await analyst.signIn('analyst@example.org', 'isthmus-demo')
    // A 1 km sphere (icosphere, 5120 faces) at 1000 kg m⁻³.
    const res = await uploadLobe(analyst, writePly(icosphere(4, 1), 'binary_little_endian'), 'ball.ply', { density: '1000', units: 'km' })
    expect(res.status, res.text).toBe(201)
    ball = res.json
    browser = await openBrowser()
    await signInBrowser(browser.context, server.url)
  })
  afterAll(async () => {
    await browser?.close()
    await server?.dispose()
  })

  it('draws a sphere lobe on its page, turns with the mouse and the keyboard, shows wireframe, saves a PNG and frees the renderer on leaving', async () => {
    const page = await browser.context.newPage()
    await page.goto(`${server.url}/lobes/${ball.id}`)
    const canvas = page.getByTestId('viewer-canvas')
    await expect.poll(() => canvas.getAttribute('data-first-frame-ms'), { timeout: 30_000 }).toBeTruthy()
    await expect.poll(() => page.getByTestId('viewer-busy').count()).toBe(0)
    await page.getByLabel('Fixed to the body').check()
    await settled(page, 0)

    const solid = await canvas.screenshot({ path: 'test-results/viewer-lobe.png' })
    const s = await analyse(page, solid)
    // The fitted sphere fills a disc of roughly (0.9 H / 2)² π: far more than a few pixels, far less than all.
    expect(s.body / (s.width * s.height)).toBeGreaterThan(0.1)
    expect(s.body / (s.width * s.height)).toBeLessThan(0.8)

    // Drag across the canvas: with the sun fixed to the body, the lit side moves away.
    const box = (await canvas.boundingBox())!
    let n = await frames(page)
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2)
    await page.mouse.down()
    for (let i = 1; i <= 10; i++) await page.mouse.move(box.x + box.width / 2 + 25 * i, box.y + box.height / 2 + 5 * i)
    await page.mouse.up()
    await settled(page, n)
    const turned = await canvas.screenshot()
    expect(await changedFraction(page, solid, turned)).toBeGreaterThan(0.03)

    // Keyboard: "+" zooms in (more of the canvas covered), "0" resets.
    await canvas.focus()
    n = await frames(page)
    await page.keyboard.press('+')
    await page.keyboard.press('+')
    await settled(page, n)
    expect((await analyse(page, await canvas.screenshot())).body).toBeGreaterThan(s.body * 1.2)
    n = await frames(page)
    await page.keyboard.press('0')
    await page.keyboard.press('ArrowLeft')
    await settled(page, n)

    // Wireframe: only the edges are drawn, so background shows between them inside the disc.
    n = await frames(page)
    await page.getByLabel('Wireframe').check()
    await settled(page, n)
    const wire = await analyse(page, await canvas.screenshot({ path: 'test-results/viewer-wireframe.png' }))
    expect(wire.body).toBeLessThan(s.body * 0.9)
    expect(wire.body).toBeGreaterThan(s.body * 0.2)
    await page.getByLabel('Wireframe').uncheck()

    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Save PNG' }).click()])
    expect(download.suggestedFilename()).toBe(`isthmus-lobe-${ball.id}.png`)
    const saved = readFileSync((await download.path())!)
    expect([...saved.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])
    const exported = await analyse(page, saved)
    expect(exported.width).toBe(s.width)
    expect(exported.body / (exported.width * exported.height)).toBeGreaterThan(0.1)

    // Leaving the page unmounts the view: TresCanvas disposes the renderer and drops its context.
    await page.evaluate(() => { (window as any).__viewerCanvas = document.querySelector('[data-testid=viewer-canvas] canvas') })
    await page.getByRole('link', { name: 'Overview' }).first().click()
    await page.waitForURL(`${server.url}/`)
    await expect.poll(() => page.evaluate(() => {
      const c = (window as any).__viewerCanvas as HTMLCanvasElement
      return !c.isConnected && (c.getContext('webgl2') as WebGL2RenderingContext | null)?.isContextLost() === true
    })).toBe(true)
    await page.close()
  })

  it('colours the sphere by surface gravity with a legend matching (4/3)πGρR', async () => {
    const deadline = Date.now() + 60_000
    while ((await analyst.get(`/api/lobes/${ball.id}`)).json.properties.gravityJob.status !== 'done') {
      if (Date.now() > deadline) throw new Error('surface job did not finish')
      await new Promise(r => setTimeout(r, 300))
    }
    const page = await browser.context.newPage()
    await page.goto(`${server.url}/lobes/${ball.id}`)
    await expect.poll(() => page.getByTestId('viewer-canvas').getAttribute('data-first-frame-ms'), { timeout: 30_000 }).toBeTruthy()
    await page.getByLabel('Surface colour').selectOption('gravity')
    const legend = page.getByTestId('field-legend')
    await expect.poll(() => legend.count(), { timeout: 10_000 }).toBe(1)
    expect(await legend.innerText()).toContain('m s⁻²')
    // Uniform sphere: g = GM/R² = (4/3)πGρR (Newton's shell theorem); the icosphere's inscribed
    // facets and the evaluation points sit slightly inside R, so allow 5 %.
    const g = (4 / 3) * Math.PI * G * 1000 * 1000
    for (const k of ['data-min', 'data-max']) expect(Number(await legend.getAttribute(k)) / g).toBeCloseTo(1, 1)
    const coloured = await analyse(page, await page.getByTestId('viewer-canvas').screenshot())
    expect(coloured.body).toBeGreaterThan(1000)
    await page.close()
  })

  it('keeps the toolbar tidy: Save PNG on the first row at 1400 px, the "Look along" label beside its buttons on a phone', async () => {
    const page = await browser.context.newPage()
    await page.setViewportSize({ width: 1400, height: 900 })
    await page.goto(`${server.url}/lobes/${ball.id}`)
    await expect.poll(() => page.getByTestId('viewer-canvas').getAttribute('data-first-frame-ms'), { timeout: 30_000 }).toBeTruthy()
    const centreY = async (l: ReturnType<Page['locator']>) => {
      const b = (await l.boundingBox())!
      return b.y + b.height / 2
    }
    const reset = page.getByRole('button', { name: 'Reset view' })
    expect(Math.abs(await centreY(page.getByTestId('save-png')) - await centreY(reset))).toBeLessThan(4)
    await page.setViewportSize({ width: 390, height: 844 })
    const group = page.getByTestId('look-along')
    const label = page.getByTestId('look-along-label')
    const first = group.getByRole('button').first()
    await expect.poll(async () => Math.abs(await centreY(label) - await centreY(first))).toBeLessThan(4)
    await page.close()
  })

  it('says so when WebGL is unavailable', async () => {
    const page = await browser.context.newPage()
    await page.addInitScript(() => {
      const original = HTMLCanvasElement.prototype.getContext
      HTMLCanvasElement.prototype.getContext = function (this: HTMLCanvasElement, type: string, ...rest: unknown[]) {
        if (type.startsWith('webgl')) return null
        return (original as any).call(this, type, ...rest)
      } as typeof original
    })
    await page.goto(`${server.url}/lobes/${ball.id}`)
    await expect.poll(() => page.getByTestId('viewer').getByRole('alert').innerText()).toMatch(/WebGL/)
    await page.close()
  })

  it.runIf(existsSync('server/api/studies'))('draws two touching spheres of a study: projected area along the orbit normal, union toggle, approach, and no open connection', async () => {
    // Spheres of 1 km and 0.6 km meeting head-on along x, orbit normal z.
    const RA = 1000
    const RB = 600
    const a = (await uploadLobe(analyst, writePly(icosphere(4, 1), 'binary_little_endian'), 'big.ply', { density: '1000', units: 'km' })).json
    const b = (await uploadLobe(analyst, writePly(icosphere(4, 0.6), 'binary_little_endian'), 'small.ply', { density: '1000', units: 'km' })).json
    const created = await analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [1, 0, 0], orbitNormal: [0, 0, 1], orbit: { kind: 'parabolic' }, sweepSteps: 0 })
    expect(created.status, created.text).toBe(202)
    const study = await waitForStudy(analyst, created.json.id)
    expect(study.status, study.error).toBe('done')

    const page = await browser.context.newPage()
    const pending = new Set<string>()
    const started: { url: string, at: number, type: string }[] = []
    page.on('request', (r) => {
      pending.add(r.url() + r.method())
      started.push({ url: r.url(), at: Date.now(), type: r.resourceType() })
    })
    page.on('requestfinished', r => pending.delete(r.url() + r.method()))
    page.on('requestfailed', r => pending.delete(r.url() + r.method()))
    await page.goto(`${server.url}/studies/${study.id}`)
    const canvas = page.getByTestId('viewer-canvas')
    await expect.poll(() => canvas.getAttribute('data-first-frame-ms'), { timeout: 30_000 }).toBeTruthy()

    // Nothing stays open or keeps polling once the finished study is on screen (a one-off check of
    // the app's build manifest under /_nuxt/ is not a connection to the API).
    await page.waitForTimeout(2500)
    const quietSince = Date.now() - 2000
    expect([...pending]).toEqual([])
    expect(started.filter(s => s.at > quietSince && !new URL(s.url).pathname.startsWith('/_nuxt/')).map(s => s.url)).toEqual([])
    expect(started.some(s => s.type === 'eventsource' || s.type === 'websocket')).toBe(false)

    await page.getByLabel('Markers').uncheck()
    await page.getByLabel('Axes', { exact: true }).uncheck()
    await page.getByLabel('Scale bar').uncheck()
    await page.getByLabel('Orthographic').check()
    let n = await frames(page)
    await page.getByRole('button', { name: 'Look down the orbit normal of the approach' }).click()
    await settled(page, n)
    expect(await canvas.getAttribute('data-projection')).toBe('orthographic')
    const wpp = Number(await canvas.getAttribute('data-world-per-pixel'))
    expect(wpp).toBeGreaterThan(0)
    // Two discs touching at a point: area π(R_A² + R_B²), in pixels at wpp metres per pixel. The
    // icosphere silhouette (inscribed polygon) is a little smaller than the disc: within the ±5 %.
    const expected = Math.PI * (RA * RA + RB * RB) / (wpp * wpp)
    const lobesView = await analyse(page, await canvas.screenshot({ path: 'test-results/viewer-joined.png' }))
    expect(lobesView.body / expected).toBeGreaterThan(0.95)
    expect(lobesView.body / expected).toBeLessThan(1.05)
    // The view puts the line of centres left to right: B (sky blue) right of A (orange).
    expect(lobesView.blueX).toBeGreaterThan(lobesView.orangeX)
    // Colour-coded: B's sky-blue disc is (R_B/R_A)² of A's orange one.
    expect(lobesView.blue / lobesView.orange).toBeGreaterThan(0.3)
    expect(lobesView.blue / lobesView.orange).toBeLessThan(0.45)

    const geometries = Number(await canvas.getAttribute('data-geometries'))
    n = await frames(page)
    await page.getByTestId('union-toggle').click()
    await expect.poll(() => page.getByTestId('joined-legend').innerText(), { timeout: 20_000 }).toContain('Union of the two lobes')
    await expect.poll(async () => (await analyse(page, await canvas.screenshot())).grey, { timeout: 20_000 }).toBeGreaterThan(lobesView.body * 0.8)
    const unionView = await analyse(page, await canvas.screenshot())
    expect(unionView.body / expected).toBeGreaterThan(0.95)
    expect(unionView.body / expected).toBeLessThan(1.05)
    expect(unionView.blue).toBeLessThan(lobesView.blue * 0.05)

    // Back to the lobes, and again: the union is kept, nothing new is allocated per toggle.
    await page.getByTestId('union-toggle').click()
    await page.getByTestId('union-toggle').click()
    await page.getByTestId('union-toggle').click()
    await settled(page, n)
    const again = await analyse(page, await canvas.screenshot())
    expect(again.blue / lobesView.blue).toBeCloseTo(1, 1)
    expect(Number(await canvas.getAttribute('data-geometries'))).toBeLessThanOrEqual(geometries + 1)

    // Approach slider: B moves away from A along the line of centres (on screen, sideways).
    n = await frames(page)
    await page.getByLabel(/^Approach/).fill('0.2')
    await settled(page, n)
    const apart = await analyse(page, await canvas.screenshot())
    const shiftPx = Math.hypot(apart.blueX - again.blueX, apart.blueY - again.blueY)
    expect(Math.abs(apart.blueY - again.blueY)).toBeLessThan(3)
    // 0.2 × 2 (R_A + R_B) = 640 m, seen at wpp metres per pixel (the view's scale does not change).
    expect(Number(await canvas.getAttribute('data-world-per-pixel'))).toBe(wpp)
    expect(shiftPx * wpp / 640).toBeCloseTo(1, 1)
    // The help text and the offset read as two sentences.
    expect(await page.getByTestId('approach-help').innerText()).toMatch(/lobe radii\. B moved back by 640 m\.$/)
    // The legend names what is drawn: contact point, merged centroid and axes; the neck ring only
    // when the study has an outline to draw (a point contact has none).
    await page.getByLabel('Markers').check()
    const legend = await page.getByTestId('joined-legend').innerText()
    expect(legend).toContain('First-contact point')
    expect(legend).toContain('Centroid of the merged body')
    expect(legend.includes('Neck outline')).toBe((study.result.neck?.outline?.length ?? 0) >= 3)
    await page.close()
  })
})
