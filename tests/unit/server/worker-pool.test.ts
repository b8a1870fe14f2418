import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import { icosphere } from '#shared/geometry'
import { encodeAnalysisMesh } from '../../../shared/utils/mesh-binary'
import type { WorkerPool as Pool } from '../../../server/utils/worker-pool'

// The pool's scheduling and its handling of dying threads, with real worker threads running the
// real thread bundle (built here with esbuild, as nuxt.config.ts builds it) on a small mesh.
describe('worker pool', () => {
  const dir = mkdtempSync(join(tmpdir(), 'isthmus-pool-'))
  // Inside the project, so that the bundle's external packages resolve from node_modules.
  const workers = resolve('.nuxt', `pool-test-${process.pid}`)
  let mod: typeof import('../../../server/utils/worker-pool')
  let pool: Pool
  beforeAll(async () => {
    const { build } = await import('esbuild')
    await build({
      entryPoints: { 'task-thread': resolve('server/workers/task-thread.ts') },
      outdir: workers, outExtension: { '.js': '.mjs' }, bundle: true, platform: 'node', format: 'esm', target: 'node20',
      external: ['manifold-3d', 'bullmq', 'ioredis', '@aws-sdk/client-s3'],
      banner: { js: 'import { createRequire as __isthmusRequire } from \'node:module\'; const require = __isthmusRequire(import.meta.url);' },
      logLevel: 'warning',
    })
    process.env.ISTHMUS_WORKERS_DIR = workers
    process.env.UPLOADS_DIR = join(dir, 'uploads')
    mkdirSync(join(dir, 'uploads', 'derived'), { recursive: true })
    const m = icosphere(1, 1)
    writeFileSync(join(dir, 'uploads', 'derived', 'ball.analysis.bin'), encodeAnalysisMesh(m.positions, m.indices))
    mod = await import('../../../server/utils/worker-pool')
    pool = new mod.WorkerPool(1)
  }, 60_000)
  afterAll(async () => {
    await pool?.close()
    rmSync(dir, { recursive: true, force: true })
    rmSync(workers, { recursive: true, force: true })
  })

  const display = (n: string) => ({ analysisKey: 'derived/ball.analysis.bin', displayKey: `derived/${n}.display.bin`, displayFaceBudget: 1000 })

  it('serves interactive work first, then the jobs in turn, one task each', async () => {
    const started: string[] = []
    const run = (name: string, opts: { lane?: string, interactive?: boolean }) => pool.run('display', display(name), { ...opts, onStart: () => started.push(name) })
    const all = [
      ...['a1', 'a2', 'a3', 'a4'].map(n => run(n, { lane: 'A' })),
      ...['b1', 'b2'].map(n => run(n, { lane: 'B' })),
      run('i1', { interactive: true }),
    ]
    await Promise.all(all)
    // a1 took the idle thread at once; then the upload-like task; then A and B alternate.
    expect(started).toEqual(['a1', 'i1', 'a2', 'b1', 'a3', 'b2', 'a4'])
  })

  it('runs a task again when its thread exits without an error event, and gives up after the second loss', async () => {
    const survived = pool.run('display', display('x1'), { lane: 'C' })
    await pool.killBusy()
    await expect(survived).resolves.toEqual({ ok: true })

    const lost = pool.run('display', display('x2'), { lane: 'C' })
    const settled = lost.catch((e: unknown) => e)
    await pool.killBusy()
    await vi.waitFor(() => expect(pool.stats().busy).toBe(1), { timeout: 20_000 })
    await pool.killBusy()
    const error = await settled
    expect(error).toBeInstanceOf(mod.WorkerLost)
    expect(String((error as Error).message)).toMatch(/exited \(code \d+\) 2 times/)
    // The pool still works.
    await expect(pool.run('display', display('x3'), { interactive: true })).resolves.toEqual({ ok: true })
  })

  it('cancels a queued task at once', async () => {
    const ctl = new AbortController()
    const first = pool.run('display', display('c1'), { lane: 'D' })
    const second = pool.run('display', display('c2'), { lane: 'D', signal: ctl.signal })
    ctl.abort()
    await expect(second).rejects.toBeInstanceOf(mod.TaskCancelled)
    await expect(first).resolves.toEqual({ ok: true })
  })
})
