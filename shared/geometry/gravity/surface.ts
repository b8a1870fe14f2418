/**
 * Surface fields of the polyhedral gravity model (polyhedron.ts): evaluation points on the real
 * surface, escape speeds, and the surface-field job kernel. Points in the FILE frame, m.
 */
import type { TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import { Vector3, buildMeshBvh, disposeMeshBvh, float32Relative, simplifyTriangles } from '../adapters/three'
import type { PolyhedronModel, SurfaceFieldOut } from './polyhedron'
import { evalAt, summarise, surfaceFieldChunk } from './polyhedron'
import { G } from '../mass/mass'
import { compactVertices, faceCentroidNormal } from '../mesh/compact'

export interface EvaluationPoints {
  /** The surface the points lie on: the mesh itself, or its meshoptimizer simplification. */
  mesh: TriMesh
  /** Face centroids of `mesh`, file frame, m (3 per point). */
  points: Float64Array
  /** Unit outward face normals of `mesh`. */
  normals: Float64Array
  /** Face areas of `mesh`, m² (weights for area-weighted means). */
  areas: Float64Array
}

/**
 * Evaluation points for surface fields. When the mesh has more than `maxPoints` faces, a copy is
 * simplified with meshoptimizer (`MeshoptSimplifier`) to at most `maxPoints` faces — the surface the
 * results are drawn on — and each of its faces is tied to the ORIGINAL face nearest its centroid
 * (three-mesh-bvh `closestPointToPoint`): the point and normal are that original face's centroid and
 * unit normal, so every value is the field of the full polyhedron at a point of the real surface with
 * its real orientation (a simplified face's own normal can be tens of degrees off, which would show as
 * false slopes). `areas` are the simplified faces' areas (weights for means). Below the budget the
 * mesh's own faces are used.
 */
export async function evaluationPoints(mesh: TriMesh, maxPoints: number): Promise<EvaluationPoints> {
  if (!(maxPoints >= 4)) throw new GeometryError('bad-argument', `evaluationPoints: maxPoints must be ≥ 4, got ${maxPoints}`)
  let I = mesh.indices
  const P = mesh.positions
  if (I.length / 3 > maxPoints) {
    // float32 copy relative to the first vertex; the output indices refer to the original vertices
    const simp = await simplifyTriangles(P, I, maxPoints)
    I = simp.length / 3 > maxPoints ? simp.slice(0, 3 * Math.floor(maxPoints)) : simp
  }
  const simplified = compactVertices(P, I)
  const nf = simplified.indices.length / 3
  const points = new Float64Array(3 * nf), normals = new Float64Array(3 * nf), areas = new Float64Array(nf)
  for (let f = 0; f < nf; f++) areas[f] = faceCentroidNormal(simplified, f, points, normals, f)
  if (I !== mesh.indices) snapToOriginalFaces(mesh, points, normals)
  return { mesh: simplified, points, normals, areas }
}

/**
 * Escape speed from surface points (m s⁻¹), from the polyhedral potential:
 * - `nonRotating`: v = √(2U(r)), the speed that takes a particle from r to infinity in an inertial
 *   frame with the body not spinning.
 * - `alongRotation` (when spin is given): the speed relative to the rotating surface for a launch in
 *   the direction of the surface's own velocity ω × r (the most favourable direction),
 *   max(0, √(2U) − |ω × r|); the inertial energy criterion is the same, the surface just
 *   contributes |ω × r|. A launch against the rotation needs √(2U) + |ω × r|.
 * Summaries are area-weighted when `areas` is given.
 */
export function surfaceEscapeSpeed(model: PolyhedronModel, density: number, points: Float64Array, spin: { omega: Vec3 } | null = null, areas?: Float64Array) {
  const n = points.length / 3
  const U = new Float64Array(n)
  const [ox, oy, oz] = model.origin
  const k = G * density
  for (let i = 0; i < n; i++) U[i] = k * evalAt(model, points[3 * i]! - ox, points[3 * i + 1]! - oy, points[3 * i + 2]! - oz, null, null)
  return escapeSpeedsFromPotential(U, points, model.origin, spin, areas)
}

/**
 * The escape speeds of `surfaceEscapeSpeed` from an already evaluated gravitational potential U
 * (m² s⁻², > 0, e.g. `surfaceFieldChunk`'s `gravitationalPotential`), without a second kernel pass.
 * points: file frame, m; origin: the spin axis point (the model's centroid), m.
 */
export function escapeSpeedsFromPotential(gravitationalPotential: Float64Array, points: Float64Array, origin: Vec3, spin: { omega: Vec3 } | null = null, areas?: Float64Array) {
  const n = gravitationalPotential.length
  const nonRotating = new Float64Array(n)
  const along = spin ? new Float64Array(n) : null
  const [wx, wy, wz] = spin ? spin.omega : [0, 0, 0]
  const [ox, oy, oz] = origin
  for (let i = 0; i < n; i++) {
    const v = Math.sqrt(2 * Math.max(0, gravitationalPotential[i]!))
    nonRotating[i] = v
    if (along) {
      const rx = points[3 * i]! - ox, ry = points[3 * i + 1]! - oy, rz = points[3 * i + 2]! - oz
      along[i] = Math.max(0, v - Math.hypot(wy * rz - wz * ry, wz * rx - wx * rz, wx * ry - wy * rx))
    }
  }
  return {
    nonRotating, alongRotation: along,
    summary: { nonRotating: summarise(nonRotating, areas), alongRotation: along ? summarise(along, areas) : null },
  }
}

/**
 * The surface-field job's kernel (worker pool and bench): `surfaceFieldChunk` over all `points`
 * in `chunks` slices (for progress), then the escape speed from the same potential:
 * `escape` = √(2U) with U the GRAVITATIONAL potential alone, i.e. the inertial escape speed with the
 * body not spinning, also when `spin` is given (spin enters `potential` = U + ½|ω × r|², `slopeDeg`
 * and `totalAcceleration`; the launch-direction-dependent speeds are `escapeSpeedsFromPotential`'s
 * `alongRotation`). One Werner–Scheeres evaluation per point.
 */
export function surfaceFieldWithEscape(model: PolyhedronModel, density: number, points: Float64Array, normals: Float64Array, spin: { omega: Vec3 } | null,
  onProgress?: (fraction: number) => void, chunks = 20): SurfaceFieldOut & { gravitationalPotential: Float64Array, escape: Float64Array } {
  const n = points.length / 3
  const out = { gravity: new Float64Array(n), slopeDeg: new Float64Array(n), potential: new Float64Array(n), gravitationalPotential: new Float64Array(n) }
  const step = Math.max(1, Math.ceil(n / chunks))
  for (let s = 0; s < n; s += step) {
    surfaceFieldChunk(model, density, points, normals, spin, s, Math.min(n, s + step), out)
    onProgress?.(Math.min(1, (s + step) / n))
  }
  return { ...out, escape: escapeSpeedsFromPotential(out.gravitationalPotential, points, model.origin).nonRotating }
}

/** Replaces each point by the centroid and unit normal of the original face nearest to it. */
function snapToOriginalFaces(mesh: TriMesh, points: Float64Array, normals: Float64Array) {
  const P = mesh.positions, I = mesh.indices
  const o = [P[0]!, P[1]!, P[2]!]
  const bvh = buildMeshBvh(float32Relative(P), I, { indirect: true })
  const q = new Vector3()
  const hit = { point: new Vector3(), distance: 0, faceIndex: 0 }
  for (let k = 0; k < points.length / 3; k++) {
    q.set(points[3 * k]! - o[0]!, points[3 * k + 1]! - o[1]!, points[3 * k + 2]! - o[2]!)
    if (!bvh.closestPointToPoint(q, hit)) continue
    faceCentroidNormal(mesh, hit.faceIndex, points, normals, k)
  }
  disposeMeshBvh(bvh)
}
