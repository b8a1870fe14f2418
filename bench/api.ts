/**
 * Upload through the HTTP API on loopback: a generated 1 310 720-face closed ellipsoid as binary
 * PLY, timed to the 201 with its properties, while a second client keeps asking /api/health to
 * show the server answering meanwhile (the analysis runs on a worker thread).
 * Run: `npx tsx bench/api.ts` (builds the app first when .output is missing).
 */
import { existsSync } from 'node:fs'
import { spawnSync } from 'node:child_process'
import { fileURLToPath } from 'node:url'
import { ellipsoidMesh, writePly } from '#shared/geometry'
import { Agent } from '../tests/e2e/support/http'
import { uploadLobe } from '../tests/e2e/support/lobes'
import { startServer } from '../tests/e2e/support/server'

function percentile(sorted: number[], p: number) {
  return sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))] ?? Number.NaN
}

export async function runApiBench(): Promise<Record<string, number>> {
  if (!existsSync('.output/server/index.mjs')) spawnSync('npx', ['nuxt', 'build'], { stdio: 'inherit' })
  const mesh = ellipsoidMesh(12_000, 8_000, 6_000, 8)
  const bytes = writePly(mesh, 'binary_little_endian')
  // An idle server (no demo content computing its surface fields in the background).
  const server = await startServer({ ISTHMUS_MAX_UPLOAD_MB: '512' })
  try {
    const analyst = new Agent(server.url)
    await analyst.signIn('root@example.org', 'root-password-123')
    // Warm the worker pool with a small upload, so the figure is the steady state.
    await uploadLobe(analyst, writePly(ellipsoidMesh(3, 2, 1, 2), 'binary_little_endian'), 'warm.ply', { density: '1000', units: 'm' })
    let polling = true
    const health: number[] = []
    const poller = (async () => {
      while (polling) {
        const t = performance.now()
        await fetch(`${server.url}/api/health`)
        health.push(performance.now() - t)
        await new Promise(r => setTimeout(r, 20))
      }
    })()
    const t0 = performance.now()
    const res = await uploadLobe(analyst, bytes, 'ellipsoid-1310720.ply', { density: '1000', units: 'm' })
    const uploadMs = performance.now() - t0
    polling = false
    await poller
    if (res.status !== 201) throw new Error(`upload failed: ${res.status} ${res.text.slice(0, 200)}`)
    health.sort((a, b) => a - b)
    const figures = {
      faces: mesh.indices.length / 3,
      fileMB: bytes.length / 1e6,
      uploadToPropertiesS: uploadMs / 1000,
      healthRequestsDuringUpload: health.length,
      healthP50Ms: percentile(health, 0.5),
      healthMaxMs: health[health.length - 1] ?? Number.NaN,
    }
    console.info('\n== API upload (loopback) ==')
    console.info(`binary PLY, ${figures.faces.toLocaleString('en')} faces, ${figures.fileMB.toFixed(1)} MB: 201 with properties in ${figures.uploadToPropertiesS.toFixed(2)} s (target ≤ 1.5 s)`)
    console.info(`server: ${res.headers.get('server-timing')}`)
    console.info(`worker stages (ms): ${JSON.stringify(Object.fromEntries(Object.entries(res.json.report.timingsMs as Record<string, number>).map(([k, v]) => [k, Math.round(v)])))}`)
    console.info(`/api/health during the upload: ${figures.healthRequestsDuringUpload} answers, p50 ${figures.healthP50Ms.toFixed(1)} ms, max ${figures.healthMaxMs.toFixed(1)} ms`)
    return figures
  }
  finally {
    await server.dispose()
  }
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) await runApiBench()
