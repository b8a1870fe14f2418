import type { Vec3 } from '#shared/geometry'
import { evaluationPoints, surfaceFieldWithEscape } from '#shared/geometry'
import type { TaskProgress } from './tasks'
import { loadAnalysisMesh, loadModel } from './worker-io'

/** Surface-field tasks: choosing evaluation points, then the field at a slice of them. */

export interface FieldPreparePayload { analysisKey: string, maxPoints: number }
export interface FieldPrepareResult {
  positions: Float64Array
  indices: Uint32Array
  points: Float64Array
  normals: Float64Array
  areas: Float64Array
  sameAsMesh: boolean
}

async function fieldPrepare(p: FieldPreparePayload): Promise<FieldPrepareResult> {
  const mesh = await loadAnalysisMesh(p.analysisKey)
  const ev = await evaluationPoints(mesh, p.maxPoints)
  return { positions: ev.mesh.positions, indices: ev.mesh.indices, points: ev.points, normals: ev.normals, areas: ev.areas, sameAsMesh: ev.mesh.indices.length === mesh.indices.length }
}

export interface FieldChunkPayload {
  analysisKey: string
  /** kg m⁻³ */
  density: number
  /** Evaluation points and outward unit normals, metres, file frame (x, y, z per point). */
  points: Float64Array
  normals: Float64Array
  /** Spin vector, rad s⁻¹, file frame; null → not rotating. */
  omega: Vec3 | null
}
export interface FieldChunkResult { gravity: Float64Array, slopeDeg: Float64Array, potential: Float64Array, escape: Float64Array }

async function fieldChunk(p: FieldChunkPayload, progress: TaskProgress): Promise<FieldChunkResult> {
  const model = await loadModel(p.analysisKey)
  // One kernel pass: the escape speed comes from the same potential (√(2U), gravitational U alone).
  const { gravitationalPotential: _u, ...out } = surfaceFieldWithEscape(model, p.density, p.points, p.normals, p.omega ? { omega: p.omega } : null, f => progress(f, 'surface field'))
  return out as FieldChunkResult
}

export const fieldTasks = { 'field-prepare': fieldPrepare, 'field-chunk': fieldChunk }
