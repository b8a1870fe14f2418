/**
 * Full-shape mutual gravitational potential of two homogeneous polyhedral lobes.
 *
 *   W = ∫_B ρ_B U_A(x) dV  (J; > 0; the mutual potential ENERGY is −W)
 *   F = ∫_B ρ_B ∇U_A(x) dV (N; force on B from A)
 *
 * U_A is A's exact constant-density polyhedral potential (gravity.ts, Werner & Scheeres 1997).
 * The volume integral over B is a deterministic quadrature: B is decomposed into signed tetrahedra
 * (B's centroid + each face; valid for non-convex B because the signed parts cancel outside B),
 * each integrated with a collapsed (Duffy) Gauss–Legendre product rule of n points per direction
 * (n³ points per tetrahedron, exact for polynomials of degree 2n − 3 in the tetrahedron). The
 * convergence estimate is |W_n − W_{n−1}|/|W_n|; the order is raised from `order` (3) until it is below
 * `tolerance` (default 1e-4) or `maxOrder` (5) is reached, and the report says which. Mutual-potential formulation after Werner &
 * Scheeres 2005, CMDA 91 [mem]; here evaluated by direct quadrature, not by series.
 *
 * Cost ∝ faces_B · n³ · (faces_A + edges_A): large lobes are first simplified (meshoptimizer) to
 * `maxFaces` faces each, with the density rescaled so each lobe keeps its mass; the report says so.
 * The convergence estimate measures the quadrature only, not the simplification.
 */
import type { TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import { simplifyTriangles } from '../adapters/three'
import type { Pose } from '../contact/first-contact'
import { applyPose } from '../contact/first-contact'
import type { PolyhedronModel } from '../gravity/polyhedron'
import { potential, potentialAndAcceleration, preparePolyhedron } from '../gravity/polyhedron'
import { massProperties } from '../mass/mass'
import { compactVertices } from '../mesh/compact'

/** Gauss–Legendre nodes and weights on [0, 1] (n ≤ 5), from the classical tables. */
const GL: Record<number, { x: number[], w: number[] }> = (() => {
  const raw: Record<number, [number[], number[]]> = {
    1: [[0], [2]],
    2: [[-0.5773502691896257, 0.5773502691896257], [1, 1]],
    3: [[-0.7745966692414834, 0, 0.7745966692414834], [0.5555555555555556, 0.8888888888888888, 0.5555555555555556]],
    4: [[-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526], [0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538]],
    5: [[-0.9061798459386640, -0.5384693101056831, 0, 0.5384693101056831, 0.9061798459386640], [0.2369268850561891, 0.4786286704993665, 0.5688888888888889, 0.4786286704993665, 0.2369268850561891]],
  }
  const out: Record<number, { x: number[], w: number[] }> = {}
  for (const k of Object.keys(raw)) {
    const [x, w] = raw[+k]
    out[+k] = { x: x.map(v => (v + 1) / 2), w: w.map(v => v / 2) }
  }
  return out
})()

/**
 * Quadrature points and weights (m, m³) for the volume of a closed mesh: signed tetrahedra from
 * `apex`, collapsed Gauss–Legendre of order n (1..5). Weights sum to the mesh volume.
 */
export function volumeQuadrature(mesh: TriMesh, apex: Vec3, order: number): { points: Float64Array, weights: Float64Array } {
  if (!GL[order]) throw new GeometryError('bad-input', `volumeQuadrature: order must be 1..5, got ${order}`)
  const { x, w } = GL[order]
  const P = mesh.positions, I = mesh.indices
  const nf = I.length / 3
  const per = order ** 3
  const points = new Float64Array(3 * nf * per)
  const weights = new Float64Array(nf * per)
  let k = 0
  for (let f = 0; f < nf; f++) {
    const a = 3 * I[3 * f], b = 3 * I[3 * f + 1], c = 3 * I[3 * f + 2]
    const e1 = [P[a] - apex[0], P[a + 1] - apex[1], P[a + 2] - apex[2]]
    const e2 = [P[b] - apex[0], P[b + 1] - apex[1], P[b + 2] - apex[2]]
    const e3 = [P[c] - apex[0], P[c + 1] - apex[1], P[c + 2] - apex[2]]
    const det = e1[0] * (e2[1] * e3[2] - e2[2] * e3[1]) - e1[1] * (e2[0] * e3[2] - e2[2] * e3[0]) + e1[2] * (e2[0] * e3[1] - e2[1] * e3[0])
    for (let i = 0; i < order; i++) {
      for (let j = 0; j < order; j++) {
        for (let l = 0; l < order; l++) {
          const xi = x[i], eta = x[j], zeta = x[l]
          // Barycentric weights of e1, e2, e3: (ξ(1−η), ξη(1−ζ), ξηζ); Jacobian ξ²η; det = 6 V_tet.
          const ba = xi * (1 - eta), bb = xi * eta * (1 - zeta), bc = xi * eta * zeta
          points[3 * k] = apex[0] + ba * e1[0] + bb * e2[0] + bc * e3[0]
          points[3 * k + 1] = apex[1] + ba * e1[1] + bb * e2[1] + bc * e3[1]
          points[3 * k + 2] = apex[2] + ba * e1[2] + bb * e2[2] + bc * e3[2]
          weights[k] = det * xi * xi * eta * w[i] * w[j] * w[l]
          k++
        }
      }
    }
  }
  return { points, weights }
}

function isClosed(mesh: TriMesh): boolean {
  const I = mesh.indices
  const nv = mesh.positions.length / 3
  const edges = new Map<number, number>()
  for (let f = 0; f < I.length; f += 3) {
    for (let e = 0; e < 3; e++) {
      const a = I[f + e], b = I[f + (e + 1) % 3]
      const key = a * nv + b
      edges.set(key, (edges.get(key) ?? 0) + 1)
    }
  }
  for (const [key, n] of edges) {
    const a = Math.floor(key / nv), b = key % nv
    if (n !== 1 || edges.get(b * nv + a) !== 1) return false
  }
  return true
}

/**
 * A closed simplification of `mesh` with at most about `maxFaces` faces (meshoptimizer), or the
 * mesh itself when it is small enough or the simplification does not stay closed.
 */
export async function simplifyClosed(mesh: TriMesh, maxFaces: number): Promise<{ mesh: TriMesh, simplified: boolean }> {
  if (mesh.indices.length / 3 <= maxFaces) return { mesh, simplified: false }
  const out = compactVertices(mesh.positions, await simplifyTriangles(mesh.positions, mesh.indices, maxFaces))
  return isClosed(out) ? { mesh: out, simplified: true } : { mesh, simplified: false }
}

export interface MutualPotentialResult {
  /** W = ∫_B ρ_B U_A dV, J (> 0); the mutual potential energy is −W. */
  W: number
  /** Force on B from A, N, A's file frame. */
  force: Vec3
  /** Final quadrature order n per direction (n³ points per tetrahedron) and points used at it. */
  order: number
  points: number
  /** |W_n − W_{n−1}|/|W_n| at the final order (null for n = 1). */
  convergence: number | null
  /** Target for `convergence` and whether it was reached (false: stopped at `maxOrder`). */
  tolerance: number
  converged: boolean
  /** W at each order evaluated, J. */
  history: { order: number, W: number }[]
  /** Faces used for A's potential and B's quadrature, the lobes' own face counts, and whether they were simplified. */
  facesA: number
  facesB: number
  sourceFacesA: number
  sourceFacesB: number
  simplified: boolean
}

export interface MutualPotentialOptions {
  /** First order 1..5 whose W may be accepted (default 3; it is compared with order − 1 = 2, order 1 being far too coarse). */
  order?: number
  /** Highest order 1..5 the convergence loop may reach (default 5; = order for a fixed order). */
  maxOrder?: number
  /** Target relative change |W_n − W_{n−1}|/|W_n| (default 1e-4). */
  tolerance?: number
  /** Faces per lobe above which the lobe is simplified first (default 1000). */
  maxFaces?: number
  signal?: AbortSignal
}

function integrate(model: PolyhedronModel, densityA: number, q: { points: Float64Array, weights: Float64Array }, densityB: number, withForce: boolean, signal?: AbortSignal) {
  let W = 0
  const F: Vec3 = [0, 0, 0]
  const p: Vec3 = [0, 0, 0]
  const g: Vec3 = [0, 0, 0]
  const n = q.weights.length
  for (let k = 0; k < n; k++) {
    if ((k & 1023) === 0 && signal?.aborted) throw new GeometryError('aborted', 'mutualPotential: cancelled')
    p[0] = q.points[3 * k]; p[1] = q.points[3 * k + 1]; p[2] = q.points[3 * k + 2]
    const w = q.weights[k] * densityB
    if (withForce) {
      W += w * potentialAndAcceleration(model, densityA, p, g)
      F[0] += w * g[0]; F[1] += w * g[1]; F[2] += w * g[2]
    }
    else W += w * potential(model, densityA, p)
  }
  return { W, F }
}

/**
 * Mutual potential W and force between homogeneous lobe A (file frame) and lobe B placed by
 * `poseB` relative to A's centroid (contact frame: x = R x_B + t, origin at `centroidA`).
 * Densities kg m⁻³. Orders n − 1 and n are compared, and n raised while the relative change is
 * above `tolerance` and n < `maxOrder`; W and the force are those of the last order.
 * @throws GeometryError('bad-input') for orders outside 1..5, ('aborted') when `signal` fires.
 */
export async function mutualPotential(
  meshA: TriMesh, densityA: number, centroidA: Vec3, meshB: TriMesh, densityB: number, poseB: Pose, opts: MutualPotentialOptions = {},
): Promise<MutualPotentialResult> {
  const first = opts.order ?? 3
  const maxOrder = Math.max(first, opts.maxOrder ?? 5)
  const tolerance = opts.tolerance ?? 1e-4
  if (!GL[first] || !GL[maxOrder]) throw new GeometryError('bad-input', `mutualPotential: orders must be 1..5, got ${first}..${maxOrder}`)
  const maxFaces = opts.maxFaces ?? 1000
  const sA = await simplifyClosed(meshA, maxFaces)
  const sB = await simplifyClosed(meshB, maxFaces)
  // Keep each lobe's mass through the simplification.
  const rhoA = sA.simplified ? densityA * massProperties(meshA, { density: 1 }).volume / massProperties(sA.mesh, { density: 1 }).volume : densityA
  const rhoB = sB.simplified ? densityB * massProperties(meshB, { density: 1 }).volume / massProperties(sB.mesh, { density: 1 }).volume : densityB
  const model = preparePolyhedron(sA.mesh)
  // B into A's file frame: contact frame + centroidA.
  const placed = applyPose(sB.mesh, { quaternion: poseB.quaternion, translation: [poseB.translation[0] + centroidA[0], poseB.translation[1] + centroidA[1], poseB.translation[2] + centroidA[2]] })
  const apex = massProperties(placed, { density: 1 }).centroid
  const history: { order: number, W: number }[] = []
  let order = first
  let hi = integrate(model, rhoA, volumeQuadrature(placed, apex, order), rhoB, true, opts.signal)
  history.push({ order, W: hi.W })
  let convergence: number | null = null
  if (order > 1) {
    const lo = integrate(model, rhoA, volumeQuadrature(placed, apex, order - 1), rhoB, false, opts.signal)
    history.unshift({ order: order - 1, W: lo.W })
    convergence = Math.abs(hi.W - lo.W) / Math.abs(hi.W)
  }
  while ((convergence === null || convergence >= tolerance) && order < maxOrder) {
    order++
    const next = integrate(model, rhoA, volumeQuadrature(placed, apex, order), rhoB, true, opts.signal)
    convergence = Math.abs(next.W - hi.W) / Math.abs(next.W)
    hi = next
    history.push({ order, W: hi.W })
  }
  return {
    W: hi.W,
    force: hi.F,
    order,
    points: placed.indices.length / 3 * order ** 3,
    convergence,
    tolerance,
    converged: convergence !== null && convergence < tolerance,
    history,
    facesA: sA.mesh.indices.length / 3,
    facesB: sB.mesh.indices.length / 3,
    sourceFacesA: meshA.indices.length / 3,
    sourceFacesB: meshB.indices.length / 3,
    simplified: sA.simplified || sB.simplified,
  }
}

/**
 * Contact and escape speeds with the point-mass term GMμ/d replaced by the full-shape W:
 * v² = 2W/μ − GM/a (bound), 2W/μ (parabolic), v∞² + 2W/μ (hyperbolic); v_esc = √(2W/μ).
 */
export function fullShapeSpeeds(W: number, massA: number, massB: number, orbit: { kind: 'bound', semiMajorAxis: number } | { kind: 'parabolic' } | { kind: 'hyperbolic', vInfinity: number }, G: number): { speedFullShape: number, escapeSpeedFullShape: number } {
  const M = massA + massB
  const mu = massA * massB / M
  const esc2 = 2 * W / mu
  const v2 = orbit.kind === 'bound' ? esc2 - G * M / orbit.semiMajorAxis : orbit.kind === 'parabolic' ? esc2 : esc2 + orbit.vInfinity ** 2
  return { speedFullShape: Math.sqrt(Math.max(v2, 0)), escapeSpeedFullShape: Math.sqrt(esc2) }
}
