/**
 * Geometry core benchmark: `npx tsx bench/geometry.ts`.
 * Generates a 1 310 720-face closed ellipsoid, writes it as binary PLY and OBJ to a temp dir, then
 * times (each in a fresh child process, so peak RSS and cold-JIT times are the pipeline's own):
 * read, validate, mass properties; the cost of handing the mesh's typed arrays to a worker thread
 * (postMessage with a transfer list); then the polyhedral-gravity rate and the surface field of a
 * 20 480-face lobe on 2 worker threads. Each figure is printed with its target (issue 3,
 * acceptance 3). The read/validate/mass child runs bundled JavaScript in plain Node, as the server
 * does; it also prints its RSS before the first read, so the pipeline's own share is the difference.
 * A second child first runs the start-up warm-up of the server's analysis worker (`warmPipeline`):
 * its first run is what the first upload to a running server costs.
 */
import { spawnSync } from 'node:child_process'
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { Worker } from 'node:worker_threads'
import { buildSync } from 'esbuild'
import { ellipsoidMesh, evaluationPoints, perturbedEllipsoid, potential, preparePolyhedron, summarise, validateMesh, writeObj, writePly } from '#shared/geometry'

const ms = (t: number) => `${t.toFixed(0)} ms`

/** Targets of issue 3, acceptance 3. */
const TARGET = { plySeconds: 0.4, objSeconds: 0.7, peakMB: 300, fieldSeconds: 10 }

/**
 * Runs bench/geometry-pipeline.ts in a fresh plain-Node process, bundled to JavaScript first (as
 * the server and its workers run it), so neither cold-JIT times nor peak RSS include the tsx loader.
 */
function runChild(path: string, dir: string, warm = false): { rounds: { read: number, validate: number, mass: number }[], maxRssMB: number, firstRunMaxRssMB: number, baseRssMB: number } {
  const entry = join(dir, 'geometry-pipeline.mjs')
  if (!existsSync(entry)) {
    buildSync({ entryPoints: [fileURLToPath(new URL('./geometry-pipeline.ts', import.meta.url))], bundle: true, platform: 'node', format: 'esm', target: 'node20', outfile: entry, logLevel: 'error' })
  }
  const r = spawnSync(process.execPath, [entry, path, ...(warm ? ['warm'] : [])], { encoding: 'utf8', maxBuffer: 1 << 20 })
  if (r.status !== 0) throw new Error(`bench child failed: ${r.stderr}`)
  return JSON.parse(r.stdout)
}

export async function runGeometryBench(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'isthmus-bench-'))
  try {
    let t = performance.now()
    const big = ellipsoidMesh(3000, 2000, 1500, 8)
    console.log(`generated ellipsoid: ${big.indices.length / 3} faces, ${big.positions.length / 3} vertices in ${ms(performance.now() - t)}`)
    const plyPath = join(dir, 'lobe.ply'), objPath = join(dir, 'lobe.obj')
    t = performance.now()
    const ply = writePly(big, 'binary_little_endian')
    writeFileSync(plyPath, ply)
    const obj = writeObj(big)
    writeFileSync(objPath, obj)
    console.log(`wrote binary PLY ${(ply.length / 1e6).toFixed(1)} MB and OBJ ${(obj.length / 1e6).toFixed(1)} MB in ${ms(performance.now() - t)}`)
    for (const [name, path, target] of [['binary PLY', plyPath, TARGET.plySeconds], ['OBJ', objPath, TARGET.objSeconds]] as const) {
      const res = runChild(path, dir)
      const first = res.rounds[0]!
      const best = res.rounds.reduce((a, b) => (a.read + a.validate + a.mass <= b.read + b.validate + b.mass ? a : b))
      const fmt = (r: typeof first) => `read ${ms(r.read)}, validate ${ms(r.validate)}, mass ${ms(r.mass)}, total ${ms(r.read + r.validate + r.mass)} (target ≤ ${target} s)`
      console.log(`${name}: first run in a fresh process ${fmt(first)}; best of 3 ${fmt(best)}`)
      // the server's analysis worker warms its kernels at start (warmPipeline): its first upload is this
      const warmed = runChild(path, dir, true).rounds[0]!
      console.log(`${name}: first run after the analysis worker's start-up warm-up ${fmt(warmed)}`)
      console.log(`${name}: peak RSS of that process over the first run ${res.firstRunMaxRssMB.toFixed(0)} MB (target ≤ ${TARGET.peakMB} MB; Node + modules before the first read ${res.baseRssMB.toFixed(0)} MB, the run itself ${(res.firstRunMaxRssMB - res.baseRssMB).toFixed(0)} MB), over all three runs ${res.maxRssMB.toFixed(0)} MB`)
    }
    await transferBench(big)

    // polyhedral gravity rate
    const lobe = perturbedEllipsoid(1500, 1000, 800, 5, 7, 0.15)
    const nf = lobe.indices.length / 3
    const model = preparePolyhedron(validateMesh(lobe).mesh)
    const np = 200
    t = performance.now()
    for (let i = 0; i < np; i++) potential(model, 1000, [3000 + i, 100, 50])
    const dt = (performance.now() - t) / 1000
    console.log(`polyhedral gravity (${nf} faces, ${model.edgeLengths.length} edges): ${((nf * np) / dt / 1e6).toFixed(1)} M face·points/s on one thread`)

    // surface field on 2 workers, evaluation points = the lobe's own face centroids
    const ep = await evaluationPoints(lobe, nf)
    const n = ep.points.length / 3
    t = performance.now()
    const half = Math.ceil(n / 2)
    const omega: [number, number, number] = [0, 0, (2 * Math.PI) / (6 * 3600)]
    const parts = await Promise.all([[0, half], [half, n]].map(([start, end]) => new Promise<{ gravity: Float64Array, slopeDeg: Float64Array, escape: Float64Array }>((resolve, reject) => {
      // a .ts worker: register tsx's loader inside the worker, then import the worker module
      const api = import.meta.resolve('tsx/esm/api')
      const entry = new URL('./geometry-worker.ts', import.meta.url).href
      const w = new Worker(`import(${JSON.stringify(api)}).then((m) => { m.register(); return import(${JSON.stringify(entry)}) })`, {
        eval: true,
        workerData: { positions: lobe.positions, indices: lobe.indices, points: ep.points, normals: ep.normals, density: 1000, omega, start, end },
      })
      w.once('message', (m) => { resolve(m); void w.terminate() })
      w.once('error', reject)
    })))
    const field = (performance.now() - t) / 1000
    const g = new Float64Array(n)
    g.set(parts[0]!.gravity, 0); g.set(parts[1]!.gravity, half)
    const s = summarise(g, ep.areas)
    const esc = new Float64Array(n)
    esc.set(parts[0]!.escape, 0); esc.set(parts[1]!.escape, half)
    const se = summarise(esc, ep.areas)
    console.log(`surface field, ${nf}-face lobe at ${n} points on 2 worker threads: ${field.toFixed(2)} s (target ≤ ${TARGET.fieldSeconds} s; ${((nf * n) / field / 1e6).toFixed(1)} M face·points/s), |g| ${s.min.toExponential(3)}..${s.max.toExponential(3)} m/s², area-weighted mean ${s.mean.toExponential(3)}; escape √(2U) mean ${se.mean.toExponential(3)} m/s (same pass)`)
    console.log(`peak RSS of the bench process: ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`)
  } finally {
    rmSync(dir, { recursive: true, force: true })
  }
}

/**
 * Hand copies of the mesh's positions and indices to a fresh worker thread with a transfer list
 * (the arrays move, nothing is copied) and time postMessage itself and the round trip until the
 * worker has them and answers. The worker is started and ready before the clock starts.
 */
async function transferBench(mesh: { positions: Float64Array, indices: Uint32Array }): Promise<void> {
  const w = new Worker(`const { parentPort } = require('node:worker_threads')
parentPort.on('message', (m) => parentPort.postMessage(m.positions.length + m.indices.length))
parentPort.postMessage('ready')`, { eval: true })
  try {
    await new Promise(resolve => w.once('message', resolve))
    const runs: { post: number, roundTrip: number }[] = []
    for (let r = 0; r < 3; r++) {
      const positions = mesh.positions.slice(), indices = mesh.indices.slice()
      const reply = new Promise(resolve => w.once('message', resolve))
      const t0 = performance.now()
      w.postMessage({ positions, indices }, [positions.buffer, indices.buffer])
      const t1 = performance.now()
      await reply
      runs.push({ post: t1 - t0, roundTrip: performance.now() - t0 })
      if (positions.byteLength !== 0) throw new Error('transfer bench: the positions were copied, not transferred')
    }
    const best = runs.reduce((a, b) => (a.roundTrip <= b.roundTrip ? a : b))
    const mb = (mesh.positions.byteLength + mesh.indices.byteLength) / 1e6
    console.log(`transfer of the ${mesh.indices.length / 3}-face mesh (${mb.toFixed(1)} MB of typed arrays) to a worker thread, postMessage with transfer list, best of 3: postMessage ${best.post.toFixed(3)} ms, round trip to the worker's answer ${best.roundTrip.toFixed(3)} ms (target < 1 ms)`)
  } finally {
    await w.terminate()
  }
}

const argv = process.argv
if (argv[1] && fileURLToPath(import.meta.url) === argv[1]) await runGeometryBench()
