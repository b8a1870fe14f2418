import { spawn, type ChildProcess } from 'node:child_process'
import { createHash } from 'node:crypto'
import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { GetObjectCommand, S3Client } from '@aws-sdk/client-s3'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { icosphere, writePly } from '#shared/geometry'
import { Agent } from './support/http'
import { uploadLobe, waitForField, waitForStudy } from './support/lobes'
import { startRedis, startS3 } from './support/scale-out'
import { startServer, type RunningServer } from './support/server'

interface WorkerProcess { child: ChildProcess, log: () => string, uploads: string }

/**
 * A worker process as `npm run worker` starts it (`node scripts/worker.mjs`, without npm's wrapper
 * process so that a kill reaches the worker itself), with its own uploads folder: meshes reach it
 * only through the object store.
 */
function startWorker(env: Record<string, string>): Promise<WorkerProcess> {
  const uploads = mkdtempSync(join(tmpdir(), 'isthmus-worker-'))
  const child = spawn(process.execPath, ['scripts/worker.mjs'], { env: { PATH: process.env.PATH ?? '', ...env, UPLOADS_DIR: uploads, ISTHMUS_WORKERS: '1' }, stdio: ['ignore', 'pipe', 'pipe'] })
  let out = ''
  child.stdout!.on('data', (d: Buffer) => { out += d })
  child.stderr!.on('data', (d: Buffer) => { out += d })
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`worker did not start:\n${out}`)), 30_000)
    const check = () => {
      if (/taking tasks/.test(out)) {
        clearTimeout(timer)
        resolve({ child, log: () => out, uploads })
      }
      else if (child.exitCode !== null) reject(new Error(`worker exited:\n${out}`))
      else setTimeout(check, 50)
    }
    check()
  })
}

describe('the job engine past one machine: Redis (BullMQ), two worker processes, meshes in an S3-compatible store', () => {
  let redis: Awaited<ReturnType<typeof startRedis>>
  let s3: Awaited<ReturnType<typeof startS3>>
  let app: RunningServer
  let embedded: RunningServer
  const workers: WorkerProcess[] = []
  const meshA = writePly(icosphere(3, 300), 'binary_little_endian')
  const meshB = writePly(icosphere(3, 180), 'binary_little_endian')
  const study = (a: number, b: number) => ({ lobeA: a, lobeB: b, direction: [1, 0, 0], orbit: { kind: 'parabolic' }, overlapDepth: 3, sweepSteps: 2, spread: { seed: 11, samples: 8, densityA: { kind: 'uniform', min: 800, max: 1600 }, densityB: { kind: 'fixed', value: 1200 }, coneHalfAngleDeg: 10, scale: { kind: 'fixed', value: 1 } } })

  beforeAll(async () => {
    redis = await startRedis()
    s3 = await startS3()
    const env = { REDIS_URL: redis.url, ISTHMUS_TASK_LOCK_SECONDS: '3', ...s3.env }
    app = await startServer({ ISTHMUS_FIELD_POINTS: '500', ...env })
    for (let i = 0; i < 2; i++) workers.push(await startWorker(env))
  })
  afterAll(async () => {
    // Each part is stopped even when another fails to stop.
    for (const w of workers) {
      if (w.child.exitCode === null) w.child.kill('SIGTERM')
      rmSync(w.uploads, { recursive: true, force: true })
    }
    redis?.stop()
    await Promise.allSettled([app?.dispose(), embedded?.dispose(), s3?.stop()])
  })

  it('computes a study and a surface field on the workers, equal bit for bit to the embedded engine, and survives kill -9 of the worker running the study', async () => {
    const analyst = new Agent(app.url)
    await analyst.signIn('root@example.org', 'root-password-123')
    const a = (await uploadLobe(analyst, meshA, 'a.ply', { density: '1200', units: 'm' })).json
    const b = (await uploadLobe(analyst, meshB, 'b.ply', { density: '1200', units: 'm' })).json
    expect(a.id, JSON.stringify(a)).toBeGreaterThan(0)
    // The app runs no worker threads: every task went to a worker process.
    expect(workers.map(w => w.log()).join('')).toMatch(/task analyse #/)
    const fieldA = await waitForField(analyst, a.id)
    const posted = (await analyst.post('/api/studies', study(a.id, b.id))).json
    // kill -9 of whichever worker takes the study task, as soon as it does.
    const deadline = Date.now() + 30_000
    let victim: WorkerProcess | undefined
    while (!victim && Date.now() < deadline) {
      victim = workers.find(w => /task study #/.test(w.log()))
      if (!victim) await new Promise(r => setTimeout(r, 20))
    }
    expect(victim).toBeDefined()
    victim!.child.kill('SIGKILL')
    const done = await waitForStudy(analyst, posted.id, 120_000)
    expect(done.status, done.error).toBe('done')
    const survivor = workers.find(w => w !== victim)!
    expect(survivor.log()).toMatch(/task study #/)

    // Meshes round-trip through the object store: the original bytes are stored there, the display
    // copy comes from there, and no worker or app folder holds a mesh.
    const client = new S3Client({ endpoint: s3.endpoint, region: 'us-east-1', forcePathStyle: true, credentials: { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' } })
    const stored = await client.send(new GetObjectCommand({ Bucket: 'isthmus-test', Key: `meshes/${a.sha256}.ply` }))
    const bytes = await stored.Body!.transformToByteArray()
    expect(createHash('sha256').update(bytes).digest('hex')).toBe(createHash('sha256').update(meshA).digest('hex'))
    const display = await analyst.get(`/api/lobes/${a.id}/mesh`)
    expect(display.status).toBe(200)
    for (const dir of [join(app.env.UPLOADS_DIR!, 'meshes'), join(app.env.UPLOADS_DIR!, 'derived'), ...workers.map(w => join(w.uploads, 'derived'))]) {
      expect(existsSync(dir) ? readdirSync(dir) : []).toEqual([])
    }

    // The same work on the embedded engine (no Redis, local folder): the same numbers, bit for bit.
    embedded = await startServer({ ISTHMUS_FIELD_POINTS: '500' })
    const local = new Agent(embedded.url)
    await local.signIn('root@example.org', 'root-password-123')
    const la = (await uploadLobe(local, meshA, 'a.ply', { density: '1200', units: 'm' })).json
    const lb = (await uploadLobe(local, meshB, 'b.ply', { density: '1200', units: 'm' })).json
    expect(la.properties).toMatchObject({ volume: a.properties.volume, inertia: a.properties.inertia, J2: a.properties.J2 })
    const localField = await waitForField(local, la.id)
    expect(localField.properties.surfaceGravity).toEqual(fieldA.properties.surfaceGravity)
    const [fr, fl] = [(await analyst.get(`/api/lobes/${a.id}/fields`)).json, (await local.get(`/api/lobes/${la.id}/fields`)).json]
    for (const k of ['gravity', 'slopeDeg', 'geopotentialHeight', 'potential', 'escapeSpeed']) expect(fr[k], k).toEqual(fl[k])
    const localStudy = await waitForStudy(local, (await local.post('/api/studies', study(la.id, lb.id))).json.id, 120_000)
    expect(localStudy.status).toBe('done')
    expect(JSON.stringify(done.result)).toBe(JSON.stringify(localStudy.result))
  })
})
