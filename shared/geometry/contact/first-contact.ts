/**
 * First contact of two lobe meshes brought together along a fixed line of centres.
 *
 * Frames. Each mesh is given in its own FILE frame (metres). The CONTACT FRAME used for every
 * output of this module has A's file axes and its origin at A's centroid. Lobe B is placed by
 * `poseB`: x_contact = R_B · x_Bfile + translation, with R_B = quatToMat3(orientationB) and
 * translation = d·direction − R_B·centroidB, so B's centroid sits at d·direction.
 *
 * Method (safe for any closed meshes, convex or not):
 *  1. B starts beyond the sum of the bounding radii (no contact possible).
 *  2. Conservative advancement: the exact mesh–mesh distance δ (dual BVH branch and bound, exact
 *     triangle–triangle distance at the leaves) is a safe step, since translating B by s changes
 *     the distance by at most s. A few steps bring B close cheaply.
 *  3. Exact refinement: a best-first dual traversal of the swept B boxes against A's boxes finds
 *     the smallest translation t along −direction at which any triangle pair touches, with closed
 *     forms per pair (vertex–face ray hits both ways, edge–edge 3×3 solve). This is exact to
 *     floating point, finds edge–edge and grazing contacts, and cannot skip a contact because
 *     every pair whose swept boxes meet before the best time found is examined.
 *
 * BVHs come from three-mesh-bvh (`MeshBVH`, built once per mesh with `indirect: true`, so the
 * mesh's index order is kept). Its tree is copied into float64 arrays with bounds recomputed from
 * the float64 vertices (the library stores float32 bounds), then cached.
 */
import type { Mat3, Quat, TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import { ContactBvhCache } from './bvh'
import { meshDistanceRotated, rotateB, sweepTOI } from './traversal'
import { add, matVec, normalize, quatNormalize, quatToMat3, scale, sub } from '../math/linalg'

// ============================================================ first contact

export interface FirstContactInput {
  /** Lobe meshes in their own file frames, m, closed and outward-wound. */
  meshA: TriMesh
  meshB: TriMesh
  /** Centroids in each lobe's file frame, m (e.g. from massProperties). */
  centroidA: Vec3
  centroidB: Vec3
  /** Active rotation of B about its centroid, B's file axes → A's file axes. Default identity. */
  orientationB?: Quat
  /** Unit line of centres, from A's centroid toward B's, A's axes (normalised here). */
  direction: Vec3
}

export interface FirstContactOptions {
  /** BVH cache; a fresh one per call if omitted (BVHs are then built each time). */
  cache?: ContactBvhCache
  /** Cache keys (e.g. content hashes). Without keys the cache keys on the mesh objects. */
  keyA?: string
  keyB?: string
  /** Conservative-advancement steps before the exact sweep (default 3). */
  advancementSteps?: number
  /** Node-pair budget of each advancement lower bound (default 1500). */
  advancementPairBudget?: number
}

export interface Pose {
  /** Active rotation, B's file axes → contact frame. */
  quaternion: Quat
  /** Translation, m: x_contact = R x_Bfile + translation. */
  translation: Vec3
}

export interface FirstContact {
  /** Centroid separation at first touch, m. */
  separation: number
  /** Contact point, m, CONTACT FRAME (A's file axes, origin at A's centroid). Mean of the touching features. */
  point: Vec3
  /** Unit outward normal of A at the contact (contact frame); mean of A's touching faces' normals. */
  normalA: Vec3
  /** Unit outward normal of B at the contact (contact frame); mean of B's touching faces' normals. */
  normalB: Vec3
  /** B's placement at first touch (B file → contact frame). */
  poseB: Pose
  /** Unit line of centres used (contact frame). */
  direction: Vec3
  /** Contact kind from the touching features: how many distinct A and B faces take part. */
  touchingFacesA: number
  touchingFacesB: number
  /** Diagnostics: milliseconds (builds, search), advancement steps, node pairs visited. */
  diagnostics: { buildMs: number, searchMs: number, advancementSteps: number, pairsVisited: number }
}

function boundingRadius(mesh: TriMesh, c: Vec3): number {
  let r2 = 0
  const P = mesh.positions
  for (let i = 0; i < P.length; i += 3) {
    const d = (P[i] - c[0]) ** 2 + (P[i + 1] - c[1]) ** 2 + (P[i + 2] - c[2]) ** 2
    if (d > r2) r2 = d
  }
  return Math.sqrt(r2)
}

/** x_Afile = R x_Bfile + t for B's centroid at A's centroid + d·u. */
function placementAt(R: Mat3, cA: Vec3, cB: Vec3, u: Vec3, d: number): Vec3 {
  return sub(add(cA, scale(u, d)), matVec(R, cB))
}

/**
 * Centroid separation at which mesh B, brought in along −direction with fixed orientation, first
 * touches mesh A; contact point, normals and B's pose. Exact to floating point (see module doc).
 *
 * @throws GeometryError('bad-mesh') for malformed meshes, ('zero-vector') for a zero direction,
 *   ('no-contact') when B can travel through A's centroid without touching (cannot happen for
 *   closed lobes containing their centroids).
 */
export function firstContact(input: FirstContactInput, options: FirstContactOptions = {}): FirstContact {
  const cache = options.cache ?? new ContactBvhCache()
  const t0 = performance.now()
  const builds0 = cache.builds
  const bvhA = cache.get(input.meshA, options.keyA)
  const bvhB = cache.get(input.meshB, options.keyB)
  const buildMs = cache.builds > builds0 ? performance.now() - t0 : 0
  const t1 = performance.now()
  const u = normalize(input.direction, 'firstContact: direction')
  const q = quatNormalize(input.orientationB ?? [1, 0, 0, 0])
  const R = quatToMat3(q)
  const cA = input.centroidA, cB = input.centroidB
  const rA = boundingRadius(input.meshA, cA), rB = boundingRadius(input.meshB, cB)
  const size = Math.max(rA, rB)
  let d = (rA + rB) * 1.01 + 1e-9 * size
  const rb = rotateB(bvhB, R)
  // 1. Conservative advancement with the exact surface distance.
  // A certified lower bound of the surface distance is a safe inward step (the distance changes by
  // at most the translation). Budgeted: a cheap bound is enough, the sweep below is exact.
  const steps = options.advancementSteps ?? 3
  const budget = options.advancementPairBudget ?? 1500
  let pairs = 0, done = 0
  for (; done < steps; done++) {
    const md = meshDistanceRotated(bvhA, rb, placementAt(R, cA, cB, u, d), budget)
    pairs += md.pairsVisited
    if (!(md.lowerBound > 0.01 * size)) break
    d -= md.lowerBound * 0.999
  }
  // 2. Exact sweep over the rest of the way (B moves along −u), down to d = −(rA + rB).
  const tMax = d + rA + rB
  const tieTol = 1e-9 * size
  const sw = sweepTOI(bvhA, rb, Float64Array.from(placementAt(R, cA, cB, u, d)), scale(u, -1), tMax, tieTol)
  pairs += sw.pairsVisited
  if (sw.t === Infinity) throw new GeometryError('no-contact', 'firstContact: the lobes never touch along this line (are the meshes closed and around their centroids?)')
  const separation = d - sw.t
  // Features at the touch: mean point, mean face normals.
  const fa = new Set<number>(), fb = new Set<number>()
  let px = 0, py = 0, pz = 0
  for (const e of sw.events) {
    fa.add(e.leafA); fb.add(e.leafB)
    px += e.point[0]; py += e.point[1]; pz += e.point[2]
  }
  const ne = sw.events.length
  const pointAfile: Vec3 = [px / ne, py / ne, pz / ne]
  let nA: Vec3 = [0, 0, 0]
  for (const k of fa) nA = add(nA, [bvhA.normal[3 * k], bvhA.normal[3 * k + 1], bvhA.normal[3 * k + 2]])
  let nBlocal: Vec3 = [0, 0, 0]
  for (const k of fb) nBlocal = add(nBlocal, [bvhB.normal[3 * k], bvhB.normal[3 * k + 1], bvhB.normal[3 * k + 2]])
  const normalA = norm0(nA) ? normalize(nA) : u
  const nB = matVec(R, nBlocal)
  const normalB = norm0(nB) ? normalize(nB) : scale(u, -1)
  const translation = sub(scale(u, separation), matVec(R, cB))
  return {
    separation,
    point: sub(pointAfile, cA),
    normalA,
    normalB,
    poseB: { quaternion: q, translation },
    direction: u,
    touchingFacesA: fa.size,
    touchingFacesB: fb.size,
    diagnostics: { buildMs, searchMs: performance.now() - t1, advancementSteps: done, pairsVisited: pairs },
  }
}

function norm0(v: Vec3): boolean { return Math.hypot(v[0], v[1], v[2]) > 1e-12 }

/** Apply a pose to a mesh (new Float64 positions, same indices). */
export function applyPose(mesh: TriMesh, pose: Pose): TriMesh {
  const R = quatToMat3(pose.quaternion)
  const P = mesh.positions
  const out = new Float64Array(P.length)
  const [tx, ty, tz] = pose.translation
  for (let i = 0; i < P.length; i += 3) {
    const x = P[i], y = P[i + 1], z = P[i + 2]
    out[i] = R[0][0] * x + R[0][1] * y + R[0][2] * z + tx
    out[i + 1] = R[1][0] * x + R[1][1] * y + R[1][2] * z + ty
    out[i + 2] = R[2][0] * x + R[2][1] * y + R[2][2] * z + tz
  }
  return { positions: out, indices: mesh.indices }
}

/** A's mesh in the contact frame (translated so its centroid is at the origin). */
export function meshInContactFrame(meshA: TriMesh, centroidA: Vec3): TriMesh {
  return applyPose(meshA, { quaternion: [1, 0, 0, 0], translation: scale(centroidA, -1) })
}
