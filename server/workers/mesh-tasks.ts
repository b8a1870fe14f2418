import type { Vec3 } from '#shared/geometry'
import { massProperties, readMesh, splitAtNeck, validateMesh } from '#shared/geometry'
import { encodeAnalysisMesh } from '../../shared/utils/mesh-binary'
import { useMeshStore } from '../utils/mesh-store'
import type { TaskProgress } from './tasks'
import { displayBytes, loadAnalysisMesh, storeBytes } from './worker-io'

/** Mesh tasks: reading and validating an upload, the display copy, cutting a body at its neck. */

export interface AnalysePayload {
  /** Store key of the uploaded file. */
  sourceKey: string
  units: 'm' | 'km'
  density: number
  referenceRadius?: number
  /** Where to write the validated mesh (metres, float64). */
  analysisKey: string
  maxFaces: number
}

export interface AnalyseResult {
  format: 'obj' | 'ply'
  sourceFaceCount: number
  triangulatedPolygons: number
  properties: Record<string, unknown>
  report: Record<string, unknown> & { warnings: { code: string, message: string }[], vertexCount: number, faceCount: number }
  /** Worker time per stage, ms (for benchmarks and the server log). */
  timings: Record<string, number>
  receivedAt: number
}

async function analyse(p: AnalysePayload, progress: TaskProgress): Promise<AnalyseResult> {
  const t0 = performance.now()
  const receivedAt = Date.now()
  progress(0.05, 'reading')
  const bytes = await (await useMeshStore()).read(p.sourceKey)
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
  await storeBytes(p.analysisKey, encodeAnalysisMesh(mesh.positions, mesh.indices))
  const { faceOrigin: _faceOrigin, ...reportOut } = report
  return {
    format: read.format,
    sourceFaceCount: read.sourceFaceCount,
    triangulatedPolygons: read.triangulatedPolygons,
    properties: properties as unknown as Record<string, unknown>,
    report: reportOut as unknown as AnalyseResult['report'],
    receivedAt,
    timings: { read: t1 - t0, validate: t2 - t1, mass: t3 - t2, store: performance.now() - t3 },
  }
}

export interface DisplayPayload { analysisKey: string, displayKey: string, displayFaceBudget: number }

/** The simplified float32 copy for the browser (meshoptimizer), written beside the analysis mesh. */
async function display(p: DisplayPayload): Promise<{ ok: true }> {
  await storeBytes(p.displayKey, await displayBytes(await loadAnalysisMesh(p.analysisKey), p.displayFaceBudget))
  return { ok: true }
}

export interface SplitPayload {
  analysisKey: string
  plane?: { point: Vec3, normal: Vec3 }
  /** Keys of the two parts' analysis meshes (+normal side, −normal side). */
  outKeys: [string, string]
}
export interface SplitTaskResult {
  plane: { point: Vec3, normal: Vec3 }
  neckArea: number
  positiveVolume: number
  negativeVolume: number
  profile: { position: number, area: number }[]
}

async function split(p: SplitPayload, progress: TaskProgress): Promise<SplitTaskResult> {
  progress(0.1, 'finding the neck')
  const mesh = await loadAnalysisMesh(p.analysisKey)
  const r = await splitAtNeck(mesh, { plane: p.plane })
  progress(0.8, 'writing lobes')
  await storeBytes(p.outKeys[0], encodeAnalysisMesh(r.positive.positions, r.positive.indices))
  await storeBytes(p.outKeys[1], encodeAnalysisMesh(r.negative.positions, r.negative.indices))
  return { plane: r.plane, neckArea: r.neckArea, positiveVolume: r.positiveVolume, negativeVolume: r.negativeVolume, profile: r.profile }
}

export const meshTasks = { analyse, display, split }
