/**
 * The job engine under load, through the HTTP API of the built server on loopback.
 *  1. Embedded engine: a study of two 20 480-face lobes alone (idle time), then the 1 310 720-face
 *     ellipsoid uploaded and, at once, the same study: time until it runs (wait) and until it is
 *     done, behind the big lobe's surface-field job.
 *  2. Distributed engine: a 64-sample spread with 1 and with 2 `npm run worker` processes on Redis
 *     (one thread each), meshes in the folder store: wall time and samples per second.
 * Run: `npm run bench -- jobs` (builds the app first when .output is missing).
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process'
import { existsSync } from 'node:fs'
import { ellipsoidMesh, icosphere, writePly } from '#shared/geometry'
import { Agent } from '../tests/e2e/support/http'
import { uploadLobe, waitForField, waitForStudy } from '../tests/e2e/support/lobes'
import { startRedis } from '../tests/e2e/support/scale-out'
import { startServer } from '../tests/e2e/support/server'

const s = (ms: number) => `${(ms / 1000).toFixed(2)} s`

/** Posts a study and times it: until it leaves `queued` (a worker took it) and until it ends. */
async function timedStudy(agent: Agent, body: unknown) {
  const t = performance.now()
  const id = (await agent.post('/api/studies', body)).json.id
  let waitMs = Number.NaN
  for (;;) {
    const st = (await agent.get(`/api/studies/${id}`)).json
    if (st.status !== 'queued' && Number.isNaN(waitMs)) waitMs = performance.now() - t
    if (!['queued', 'running'].includes(st.status)) {
      if (st.status !== 'done') throw new Error(`study ${st.status}: ${st.error}`)
      return { waitMs, totalMs: performance.now() - t, study: st }
    }
    await new Promise(r => setTimeout(r, 50))
  }
}

async function embeddedFairness() {
  const server = await startServer({ ISTHMUS_MAX_UPLOAD_MB: '512' })
  try {
    const agent = new Agent(server.url)
    await agent.signIn('root@example.org', 'root-password-123')
    const a = (await uploadLobe(agent, writePly(icosphere(5, 1000), 'binary_little_endian'), 'a.ply', { density: '1000', units: 'm' })).json
    const b = (await uploadLobe(agent, writePly(icosphere(5, 600), 'binary_little_endian'), 'b.ply', { density: '1000', units: 'm' })).json
    await waitForField(agent, a.id)
    await waitForField(agent, b.id)
    const body = (direction: number[]) => ({ lobeA: a.id, lobeB: b.id, direction, orbit: { kind: 'parabolic' }, overlapDepth: 20 })
    const idle = await timedStudy(agent, body([1, 0, 0]))
    const big = writePly(ellipsoidMesh(12_000, 8_000, 6_000, 8), 'binary_little_endian')
    const upload = await uploadLobe(agent, big, 'ellipsoid-1310720.ply', { density: '1000', units: 'm' })
    if (upload.status !== 201) throw new Error(`upload failed: ${upload.status}`)
    const busy = await timedStudy(agent, body([0, 1, 0]))
    const field = (await agent.get(`/api/lobes/${upload.json.id}`)).json.properties.gravityJob
    console.info('\n== Embedded engine: a study behind a big surface field ==')
    console.info(`study of two 20 480-face lobes alone: running after ${s(idle.waitMs)}, done after ${s(idle.totalMs)}`)
    console.info(`same study posted right after the 1 310 720-face upload: running after ${s(busy.waitMs)} (target ≤ 2 s), done after ${s(busy.totalMs)} = ${(busy.totalMs / idle.totalMs).toFixed(2)}× the idle time (target ≤ 2×); the field job was then ${field.status} at ${Math.round(field.progress * 100)} %`)
    return { idleS: idle.totalMs / 1000, busyWaitS: busy.waitMs / 1000, busyS: busy.totalMs / 1000 }
  }
  finally {
    await server.dispose()
  }
}

function startWorker(env: Record<string, string>): Promise<ChildProcess> {
  const child = spawn(process.execPath, ['scripts/worker.mjs'], { env: { PATH: process.env.PATH ?? '', ...env, ISTHMUS_WORKERS: '1' }, stdio: ['ignore', 'pipe', 'pipe'] })
  let out = ''
  return new Promise((resolve, reject) => {
    child.stdout!.on('data', (d: Buffer) => {
      out += d
      if (/taking tasks/.test(out)) resolve(child)
    })
    child.stderr!.on('data', (d: Buffer) => { out += d })
    child.once('exit', () => reject(new Error(`worker exited:\n${out}`)))
  })
}

async function spreadThroughput() {
  const redis = await startRedis()
  const figures: Record<string, number> = {}
  try {
    for (const n of [1, 2]) {
      const server = await startServer({ REDIS_URL: redis.url })
      const workers: ChildProcess[] = []
      try {
        // Workers share the app's folder store (one machine here; a shared folder or S3 across machines).
        for (let i = 0; i < n; i++) workers.push(await startWorker({ REDIS_URL: redis.url, UPLOADS_DIR: server.env.UPLOADS_DIR! }))
        const agent = new Agent(server.url)
        await agent.signIn('root@example.org', 'root-password-123')
        const a = (await uploadLobe(agent, writePly(icosphere(4, 1000), 'binary_little_endian'), 'a.ply', { density: '1000', units: 'm' })).json
        const b = (await uploadLobe(agent, writePly(icosphere(4, 600), 'binary_little_endian'), 'b.ply', { density: '1000', units: 'm' })).json
        await waitForField(agent, a.id)
        await waitForField(agent, b.id)
        const spread = { seed: 5, samples: 64, densityA: { kind: 'uniform', min: 600, max: 1400 }, densityB: { kind: 'uniform', min: 600, max: 1400 }, coneHalfAngleDeg: 15, scale: { kind: 'fixed', value: 1 } }
        const t = performance.now()
        const done = await waitForStudy(agent, (await agent.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [1, 0, 0], orbit: { kind: 'parabolic' }, overlapDepth: 20, sweepSteps: 0, spread })).json.id, 900_000)
        const ms = performance.now() - t
        if (done.status !== 'done') throw new Error(`spread ${done.status}: ${done.error}`)
        figures[`workers${n}S`] = ms / 1000
        console.info(`64-sample spread (two 5 120-face lobes, with its nominal study) on ${n} worker process${n === 1 ? '' : 'es'} × 1 thread: ${s(ms)}, ${(64 / (ms / 1000)).toFixed(2)} samples/s`)
      }
      finally {
        for (const w of workers) w.kill('SIGTERM')
        await server.dispose()
      }
    }
  }
  finally {
    redis.stop()
  }
  console.info(`speed-up from 1 to 2 worker processes: ${(figures.workers1S! / figures.workers2S!).toFixed(2)}× (this machine has 2 cores shared with the app and Redis)`)
  return figures
}

export async function runJobsBench() {
  if (!existsSync('.output/server/index.mjs')) spawnSync('npx', ['nuxt', 'build'], { stdio: 'inherit' })
  const fairness = await embeddedFairness()
  console.info('\n== Distributed engine: spread throughput on Redis ==')
  const spread = await spreadThroughput()
  return { ...fairness, ...spread }
}
