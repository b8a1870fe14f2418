/**
 * Worker-thread entry for heavy mesh work, so the request thread never blocks. Messages:
 * { id, task, payload } in; { id, progress } / { id, result } / { id, error } out.
 * Built with esbuild into `<server>/workers/lobe-worker.mjs` (see nuxt.config.ts).
 */
import { readlinkSync } from 'node:fs'
import { readFile } from 'node:fs/promises'
import { setPriority } from 'node:os'
import { parentPort } from 'node:worker_threads'
import { evaluationPoints, GeometryError, massProperties, preparePolyhedron, readMesh, summarise, surfaceFieldWithEscape, validateMesh, warmPipeline } from '#shared/geometry'
import type { PolyhedronModel, TriMesh, Vec3 } from '#shared/geometry'
import { decodeAnalysisMesh, encodeAnalysisMesh } from '../../shared/utils/mesh-binary'
import { extraTasks } from './extra-tasks'
import { displayBytes, writeAtomic } from './worker-io'

export interface AnalysePayload {
  filePath: string
  units: 'm' | 'km'
  density: number
  referenceRadius?: number
  /** Where to write the validated mesh (metres, float64). */
  analysisMeshPath: string
  maxFaces: number
}

export interface DisplayPayload { analysisMeshPath: string, displayMeshPath: string, displayFaceBudget: number }

/** The simplified float32 copy for the browser (meshoptimizer), written next to the analysis mesh. */
async function display(p: DisplayPayload) {
  const { mesh } = await loadMesh(p.analysisMeshPath)
  await writeAtomic(p.displayMeshPath, await displayBytes(mesh, p.displayFaceBudget))
  return { ok: true }
}

export interface FieldPreparePayload { analysisMeshPath: string, maxPoints: number }
export interface FieldChunkPayload {
  analysisMeshPath: string
  density: number
  points: Float64Array
  normals: Float64Array
  omega: Vec3 | null
}

const port = parentPort!

async function analyse(p: AnalysePayload, progress: (f: number, stage: string) => void) {
  const t0 = performance.now()
  const receivedAt = Date.now()
  progress(0.05, 'reading')
  const bytes = new Uint8Array(await readFile(p.filePath))
  const read = readMesh(bytes, { maxFaces: p.maxFaces })
  const t1 = performance.now()
  if (p.units === 'km') {
    const P = read.mesh.positions
    for (let i = 0; i < P.length; i++) P[i] *= 1000
  }
  progress(0.35, 'validating')
  const { mesh, report, componentLabels } = validateMesh(read.mesh)
  const t2 = performance.now()
  progress(0.6, 'mass properties')
  const properties = massProperties(mesh, { density: p.density, referenceRadius: p.referenceRadius, components: { label: componentLabels, count: report.components } })
  const t3 = performance.now()
  progress(0.85, 'storing')
  await writeAtomic(p.analysisMeshPath, encodeAnalysisMesh(mesh.positions, mesh.indices))
  const { faceOrigin: _faceOrigin, ...reportOut } = report
  return {
    format: read.format,
    sourceFaceCount: read.sourceFaceCount,
    triangulatedPolygons: read.triangulatedPolygons,
    properties,
    report: reportOut,
    /** Worker time per stage, ms (for benchmarks and the server log). */
    receivedAt,
    timings: { read: t1 - t0, validate: t2 - t1, mass: t3 - t2, store: performance.now() - t3 },
  }
}

let cached: { path: string, mesh: TriMesh, model?: PolyhedronModel } | undefined
async function loadMesh(path: string) {
  if (cached?.path !== path) cached = { path, mesh: decodeAnalysisMesh(new Uint8Array(await readFile(path))) }
  return cached
}
async function loadModel(path: string) {
  const c = await loadMesh(path)
  c.model ??= preparePolyhedron(c.mesh)
  return c.model
}

async function fieldPrepare(p: FieldPreparePayload) {
  const { mesh } = await loadMesh(p.analysisMeshPath)
  const ev = await evaluationPoints(mesh, p.maxPoints)
  return { positions: ev.mesh.positions, indices: ev.mesh.indices, points: ev.points, normals: ev.normals, areas: ev.areas, sameAsMesh: ev.mesh.indices.length === mesh.indices.length }
}

async function fieldChunk(p: FieldChunkPayload, progress: (f: number, stage: string) => void) {
  const model = await loadModel(p.analysisMeshPath)
  // One kernel pass: the escape speed comes from the same potential (√(2U), gravitational U alone).
  const { gravitationalPotential: _u, ...out } = surfaceFieldWithEscape(model, p.density, p.points, p.normals, p.omega ? { omega: p.omega } : null, f => progress(f, 'surface field'))
  return out
}

const tasks: Record<string, (payload: any, progress: (f: number, stage: string) => void) => Promise<unknown>> = {
  'analyse': analyse,
  'display': display,
  'field-prepare': fieldPrepare,
  'field-chunk': fieldChunk,
  ...extraTasks,
}

/** Typed arrays in a result are transferred, not copied. */
function transferables(value: unknown, out: ArrayBuffer[] = []): ArrayBuffer[] {
  if (ArrayBuffer.isView(value)) {
    if (value.buffer instanceof ArrayBuffer && !out.includes(value.buffer)) out.push(value.buffer)
  }
  else if (value && typeof value === 'object') {
    for (const v of Object.values(value)) transferables(v, out)
  }
  return out
}

// Heavy work yields to the request thread: on Linux a thread's niceness is its own, so this worker
// lowers its priority (nice 10) and requests keep their latency while studies and fields run.
try {
  const tid = Number(readlinkSync('/proc/thread-self').split('/').pop())
  if (Number.isInteger(tid) && tid > 0) setPriority(tid, Number(process.env.ISTHMUS_WORKER_NICE ?? 10))
}
catch {
  // Not Linux, or not allowed: the worker keeps the default priority.
}

// Warm the hot loops once at start (small in-memory spheres), so the first real upload does not
// pay for the JIT's tier-up in the middle of a million-face mesh.
warmPipeline()

port.on('message', async (msg: { id: number, task: string, payload: unknown }) => {
  const progress = (fraction: number, stage: string) => port.postMessage({ id: msg.id, progress: fraction, stage })
  try {
    const run = tasks[msg.task]
    if (!run) throw new Error(`unknown worker task ${msg.task}`)
    const result = await run(msg.payload, progress)
    port.postMessage({ id: msg.id, result }, transferables(result))
  }
  catch (error) {
    const e = error as Error
    port.postMessage({
      id: msg.id,
      error: error instanceof GeometryError
        ? { name: 'GeometryError', code: error.code, message: error.message, issues: error.issues }
        : { name: e?.name ?? 'Error', message: e?.message ?? String(error), stack: e?.stack },
    })
  }
})

export { summarise }
