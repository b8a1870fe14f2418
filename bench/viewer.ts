/**
 * 3D view benchmark: `npx tsx bench/viewer.ts` (needs a build in .output: `npx nuxt build`).
 * Uploads two 1 000 000-face lobes (seeded, bumpy lat-long ellipsoids) to the built server on
 * loopback, then in headless chromium (software WebGL) opens a lobe page cold and warm (ETag 304)
 * and — when the contact study of the pair finishes within the time limit — the study page, and
 * reports bytes transferred, time to first frame (navigation start → first frame with the meshes)
 * and frames per second while rotating (mouse drag, and the turntable). Target: first frame < 3 s.
 */
import { existsSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import type { Page } from 'playwright-core'
import { seededRandom, writePly } from '#shared/geometry'
import type { TriMesh } from '#shared/geometry'
import { openBrowser } from '../tests/e2e/support/browser'
import { Agent } from '../tests/e2e/support/http'
import { uploadLobe, waitForStudy } from '../tests/e2e/support/lobes'
import { startServer } from '../tests/e2e/support/server'

/** Closed lat-long ellipsoid with 2·nLon·(nLat − 1) faces and seeded low-order bumps, metres. */
function bumpyLobe(nLon: number, nLat: number, axes: [number, number, number], seed: number): TriMesh {
  const rnd = seededRandom(seed)
  const bumps = Array.from({ length: 12 }, () => ({ l: Math.floor(rnd() * 5) + 2, m: Math.floor(rnd() * 5), a: (rnd() - 0.5) * 0.06, p: rnd() * 6.283 }))
  const nv = 2 + nLon * (nLat - 1)
  const positions = new Float64Array(nv * 3)
  const put = (i: number, th: number, ph: number) => {
    let r = 1
    for (const b of bumps) r += b.a * Math.cos(b.l * th + b.p) * Math.cos(b.m * ph)
    positions[3 * i] = axes[0] * r * Math.sin(th) * Math.cos(ph)
    positions[3 * i + 1] = axes[1] * r * Math.sin(th) * Math.sin(ph)
    positions[3 * i + 2] = axes[2] * r * Math.cos(th)
  }
  put(0, 0, 0)
  for (let j = 1; j < nLat; j++) for (let i = 0; i < nLon; i++) put(1 + (j - 1) * nLon + i, (Math.PI * j) / nLat, (2 * Math.PI * i) / nLon)
  put(nv - 1, Math.PI, 0)
  const indices = new Uint32Array(2 * nLon * (nLat - 1) * 3)
  let o = 0
  const ring = (j: number, i: number) => 1 + (j - 1) * nLon + (i % nLon)
  for (let i = 0; i < nLon; i++) indices.set([0, ring(1, i), ring(1, i + 1)], (o += 3) - 3)
  for (let j = 1; j < nLat - 1; j++) {
    for (let i = 0; i < nLon; i++) {
      indices.set([ring(j, i), ring(j + 1, i), ring(j + 1, i + 1)], (o += 3) - 3)
      indices.set([ring(j, i), ring(j + 1, i + 1), ring(j, i + 1)], (o += 3) - 3)
    }
  }
  for (let i = 0; i < nLon; i++) indices.set([nv - 1, ring(nLat - 1, i + 1), ring(nLat - 1, i)], (o += 3) - 3)
  return { positions, indices }
}

interface PageFigures { bytes: number, meshBytes: number, firstFrameMs: number, dragFps: number, turntableFps: number }

async function measurePage(page: Page, url: string): Promise<PageFigures> {
  let bytes = 0
  let meshBytes = 0
  const sizes: Promise<void>[] = []
  const onFinished = (r: import('playwright-core').Request) => {
    sizes.push(r.sizes().then((s) => {
      bytes += s.responseBodySize + s.responseHeadersSize
      if (/\/mesh$/.test(new URL(r.url()).pathname)) meshBytes += s.responseBodySize
    }).catch(() => undefined))
  }
  page.on('requestfinished', onFinished)
  await page.goto(url)
  const canvas = page.getByTestId('viewer-canvas')
  await canvas.waitFor()
  const deadline = Date.now() + 120_000
  while (!(await canvas.getAttribute('data-first-frame-ms'))) {
    if (Date.now() > deadline) throw new Error(`no first frame on ${url}`)
    await page.waitForTimeout(50)
  }
  const firstFrameMs = Number(await canvas.getAttribute('data-first-frame-ms'))
  await page.waitForTimeout(500)
  const frames = async () => Number(await canvas.getAttribute('data-frames'))

  // Drag in small steps for ~3 s: each step is one rotation, drawn on demand.
  const box = (await canvas.boundingBox())!
  const cx = box.x + box.width / 2
  const cy = box.y + box.height / 2
  await page.mouse.move(cx, cy)
  await page.mouse.down()
  let f0 = await frames()
  let t0 = performance.now()
  for (let i = 0; performance.now() - t0 < 3000; i++) {
    await page.mouse.move(cx + 200 * Math.sin(i / 15), cy + 80 * Math.cos(i / 20))
    await page.evaluate(() => new Promise(r => requestAnimationFrame(() => r(null))))
  }
  const dragFps = ((await frames()) - f0) / ((performance.now() - t0) / 1000)
  await page.mouse.up()

  // Turntable: continuous rotation, one frame per animation tick when the renderer keeps up.
  await page.getByLabel('Turntable').check()
  await page.waitForTimeout(300)
  f0 = await frames()
  t0 = performance.now()
  await page.waitForTimeout(3000)
  const turntableFps = ((await frames()) - f0) / ((performance.now() - t0) / 1000)
  await page.getByLabel('Turntable').uncheck()
  await Promise.all(sizes)
  page.off('requestfinished', onFinished)
  return { bytes, meshBytes, firstFrameMs, dragFps, turntableFps }
}

async function measureViewer(): Promise<Record<string, number | string>> {
  if (!existsSync('.output/server/index.mjs')) throw new Error('runViewerBench: build the app first (npx nuxt build)')
  const t0 = performance.now()
  const meshA = bumpyLobe(1000, 501, [2000, 1400, 1100], 7)
  const meshB = bumpyLobe(1000, 501, [1300, 1000, 800], 11)
  const faces = meshA.indices.length / 3
  const server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '500' })
  const out: Record<string, number | string> = { facesPerLobe: faces }
  try {
    const agent = new Agent(server.url)
    await agent.signIn('analyst@example.org', 'isthmus-demo')
    const a = await uploadLobe(agent, writePly(meshA, 'binary_little_endian'), 'bench-a.ply', { density: '1000', units: 'm' })
    const b = await uploadLobe(agent, writePly(meshB, 'binary_little_endian'), 'bench-b.ply', { density: '1000', units: 'm' })
    if (a.status !== 201 || b.status !== 201) throw new Error(`upload failed: ${a.status} ${b.status} ${a.text.slice(0, 200)}`)
    out.uploadSeconds = (performance.now() - t0) / 1000
    const study = await agent.post('/api/studies', { lobeA: a.json.id, lobeB: b.json.id, direction: [1, 0, 0], orbitNormal: [0, 0, 1], orbit: { kind: 'parabolic' }, sweepSteps: 0 })

    const browser = await openBrowser()
    try {
      const login = await browser.context.request.post(`${server.url}/api/session`, { data: { email: 'analyst@example.org', password: 'isthmus-demo' }, headers: { origin: server.url } })
      if (login.status() !== 200) throw new Error('browser sign-in failed')
      const page = await browser.context.newPage()
      await page.setViewportSize({ width: 1280, height: 900 })
      const cold = await measurePage(page, `${server.url}/lobes/${a.json.id}`)
      const warm = await measurePage(page, `${server.url}/lobes/${a.json.id}`)
      Object.assign(out, {
        lobeColdBytes: cold.bytes, lobeColdMeshBytes: cold.meshBytes, lobeColdFirstFrameMs: cold.firstFrameMs,
        lobeWarmBytes: warm.bytes, lobeWarmMeshBytes: warm.meshBytes, lobeWarmFirstFrameMs: warm.firstFrameMs,
        lobeDragFps: cold.dragFps, lobeTurntableFps: cold.turntableFps,
      })
      if (study.status === 202) {
        try {
          const s = await waitForStudy(agent, study.json.id, 240_000)
          if (s.status === 'done') {
            const j = await measurePage(page, `${server.url}/studies/${s.id}`)
            Object.assign(out, { studyBytes: j.bytes, studyMeshBytes: j.meshBytes, studyFirstFrameMs: j.firstFrameMs, studyDragFps: j.dragFps, studyTurntableFps: j.turntableFps })
          }
          else out.study = `study ${s.status}: ${s.error}`
        }
        catch (e) {
          out.study = (e as Error).message
        }
      }
      else out.study = `study not created: ${study.status}`
    }
    finally {
      await browser.close()
    }
  }
  finally {
    await server.dispose()
  }
  return out
}

/** Measures and prints the viewer figures (see measureViewer). */
export async function runViewerBench(): Promise<Record<string, number | string>> {
  const figures = await measureViewer()
  const fmt = (v: number | string) => (typeof v === 'number' ? (Number.isInteger(v) ? String(v) : v.toFixed(1)) : v)
  for (const [k, v] of Object.entries(figures)) console.log(`${k.padEnd(24)} ${fmt(v)}`)
  const ff = Number(figures.lobeColdFirstFrameMs)
  console.log(`first frame (cold lobe page) ${ff < 3000 ? 'within' : 'OVER'} the 3 s target`)
  return figures
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) await runViewerBench()
