/**
 * Surface-field and gravity-coefficient tasks: per-face fields from the treecode over a range of
 * faces (each worker builds the treecode of a mesh once and keeps it for its later chunks),
 * direct-sum samples for the error estimate, coefficient sums over a range of faces, and the
 * display-face → analysis-face map that colours the 3D view from the full field.
 */
import type { CoefficientFrame, FaceFields, GravityTree, Vec3 } from '#shared/geometry'
import { allocateFaceFields, buildGravityTree, coefficientSums, directSamples, faceCentroids, faceFieldChunk, nearestAnalysisFaces, treecodeScratch } from '#shared/geometry'
import type { TaskProgress } from './tasks'
import { loadAnalysisMesh } from './worker-io'

export interface FieldFacesPayload {
  analysisKey: string
  /** kg m⁻³ */
  density: number
  /** ω, rad s⁻¹, file-frame components, about the volume centroid; null: not rotating. */
  omega: Vec3 | null
  /** Treecode accuracy (relative error of |g|; U ten times tighter). */
  accuracy: number
  /** Face range [start, end) of the analysis mesh. */
  start: number
  end: number
}
/** The fields at faces [start, end) (end − start values each), with their centroids (3 each, m, file frame) and areas (m²). */
export type FieldFacesResult = FaceFields & { centroids: Float64Array, areas: Float64Array }
export interface FieldChecksPayload { analysisKey: string, density: number, indices: Uint32Array }
export interface CoefficientSumsPayload { analysisKey: string, frame: CoefficientFrame, referenceRadius: number, degree: number, start: number, end: number }
export interface DisplayMapPayload { analysisKey: string, positions: Float32Array, indices: Uint32Array, origin: Vec3 }

// Two entries: two jobs served round-robin on one worker keep their trees.
const trees = new Map<string, { tree: GravityTree, centroids: ReturnType<typeof faceCentroids> }>()

async function treeFor(analysisKey: string, accuracy: number, progress: TaskProgress) {
  const key = `${analysisKey}|${accuracy}`
  let e = trees.get(key)
  if (!e) {
    const mesh = await loadAnalysisMesh(analysisKey)
    e = { tree: buildGravityTree(mesh, { accuracy }, f => progress(0.3 * f, 'gravity tree')), centroids: faceCentroids(mesh) }
    if (trees.size >= 2) trees.delete(trees.keys().next().value!)
    trees.set(key, e)
  }
  return e
}

async function fieldFaces(p: FieldFacesPayload, progress: TaskProgress): Promise<FieldFacesResult> {
  const { tree, centroids } = await treeFor(p.analysisKey, p.accuracy, progress)
  const out = allocateFaceFields(p.end - p.start)
  faceFieldChunk(tree, p.density, centroids.points, centroids.normals, p.omega, p.start, p.end, out, p.start, treecodeScratch(tree), f => progress(0.3 + 0.7 * f, 'surface field'))
  return { ...out, centroids: centroids.points.slice(3 * p.start, 3 * p.end), areas: centroids.areas.slice(p.start, p.end) }
}

/** Direct Werner & Scheeres values (U, gx, gy, gz per sample) at the centroids of the given faces. */
async function fieldChecks(p: FieldChecksPayload, progress: TaskProgress): Promise<Float64Array> {
  const mesh = await loadAnalysisMesh(p.analysisKey)
  progress(0.1, 'direct-sum checks')
  return directSamples(mesh, p.density, faceCentroids(mesh).points, p.indices)
}

async function coefficientSumsTask(p: CoefficientSumsPayload, progress: TaskProgress): Promise<Float64Array> {
  const mesh = await loadAnalysisMesh(p.analysisKey)
  return coefficientSums(mesh, p.frame, p.referenceRadius, p.degree, p.start, p.end, undefined, f => progress(f, 'gravity coefficients'))
}

async function fieldDisplayMap(p: DisplayMapPayload): Promise<Uint32Array> {
  return nearestAnalysisFaces(await loadAnalysisMesh(p.analysisKey), p.positions, p.indices, p.origin)
}

export const fieldTasks = { 'field-faces': fieldFaces, 'field-checks': fieldChecks, 'coefficient-sums': coefficientSumsTask, 'field-display-map': fieldDisplayMap }
