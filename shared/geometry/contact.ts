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
import { BufferAttribute, BufferGeometry } from 'three'
import { MeshBVH } from 'three-mesh-bvh'
import type { Mat3, Quat, TriMesh, Vec3 } from './types'
import { GeometryError } from './types'
import { add, matVec, normalize, quatNormalize, quatToMat3, scale, sub } from './quat'

// ============================================================ BVH copy and cache

/** A float64 copy of a three-mesh-bvh tree over one mesh, with triangles stored in leaf order. */
export interface ContactBvh {
  readonly mesh: TriMesh
  /** Node boxes, 6 per node: minX, minY, minZ, maxX, maxY, maxZ (mesh file frame, m). */
  readonly box: Float64Array
  /** Left / right child node index, −1 for a leaf. */
  readonly left: Int32Array
  readonly right: Int32Array
  /** First triangle (leaf order) and triangle count of a leaf. */
  readonly start: Int32Array
  readonly count: Int32Array
  /** Triangle vertex coordinates in leaf order, 9 per triangle. */
  readonly tri: Float64Array
  /** Original face index of each leaf-order triangle. */
  readonly face: Uint32Array
  /** Unit outward normal of each leaf-order triangle, 3 per triangle. */
  readonly normal: Float64Array
  /** Milliseconds spent building (library build + copy). */
  readonly buildMs: number
}

function checkMesh(mesh: TriMesh, what: string): void {
  if (!(mesh.positions instanceof Float64Array) || !(mesh.indices instanceof Uint32Array))
    throw new GeometryError('BAD_MESH', `${what}: positions must be Float64Array and indices Uint32Array`)
  if (mesh.indices.length === 0 || mesh.indices.length % 3 !== 0)
    throw new GeometryError('BAD_MESH', `${what}: index count ${mesh.indices.length} is not a positive multiple of 3`)
  const nv = mesh.positions.length / 3
  for (let i = 0; i < mesh.indices.length; i++) {
    if (mesh.indices[i] >= nv) throw new GeometryError('BAD_MESH', `${what}: face ${Math.floor(i / 3)} refers to vertex ${mesh.indices[i]} of ${nv}`)
  }
}

/** Build the float64 contact BVH of a mesh (three-mesh-bvh `MeshBVH`, `indirect: true`). */
export function buildContactBvh(mesh: TriMesh): ContactBvh {
  checkMesh(mesh, 'buildContactBvh')
  const t0 = performance.now()
  const geometry = new BufferGeometry()
  geometry.setAttribute('position', new BufferAttribute(new Float32Array(mesh.positions), 3))
  geometry.setIndex(new BufferAttribute(mesh.indices, 1))
  const bvh = new MeshBVH(geometry, { indirect: true, targetLeafSize: 8, maxDepth: 64 })
  // Rebuild the tree topology from the pre-order traversal (left child first).
  const left: number[] = []
  const right: number[] = []
  const start: number[] = []
  const count: number[] = []
  const stack: number[] = []
  let leafTris = 0
  const order: number[] = []
  bvh.traverse((depth: number, isLeaf: boolean, _b: unknown, offset?: number, cnt?: number) => {
    const id = left.length
    left.push(-1); right.push(-1); start.push(0); count.push(0)
    if (depth > 0) {
      const parent = stack[depth - 1]
      if (left[parent] === -1) left[parent] = id
      else right[parent] = id
    }
    stack[depth] = id
    if (isLeaf) {
      start[id] = leafTris
      count[id] = cnt!
      for (let i = 0; i < cnt!; i++) order.push(bvh.resolveTriangleIndex(offset! + i))
      leafTris += cnt!
    }
    return false
  })
  const nNodes = left.length
  const nTri = order.length
  if (nTri !== mesh.indices.length / 3) throw new GeometryError('BVH_FAILED', `buildContactBvh: tree holds ${nTri} of ${mesh.indices.length / 3} faces`)
  const P = mesh.positions
  const I = mesh.indices
  const tri = new Float64Array(9 * nTri)
  const normal = new Float64Array(3 * nTri)
  const face = new Uint32Array(order)
  for (let k = 0; k < nTri; k++) {
    const f = order[k]
    for (let v = 0; v < 3; v++) {
      const vi = I[3 * f + v]
      tri[9 * k + 3 * v] = P[3 * vi]; tri[9 * k + 3 * v + 1] = P[3 * vi + 1]; tri[9 * k + 3 * v + 2] = P[3 * vi + 2]
    }
    const o = 9 * k
    const ux = tri[o + 3] - tri[o]; const uy = tri[o + 4] - tri[o + 1]; const uz = tri[o + 5] - tri[o + 2]
    const vx = tri[o + 6] - tri[o]; const vy = tri[o + 7] - tri[o + 1]; const vz = tri[o + 8] - tri[o + 2]
    let nx = uy * vz - uz * vy; let ny = uz * vx - ux * vz; let nz = ux * vy - uy * vx
    const nl = Math.hypot(nx, ny, nz) || 1
    nx /= nl; ny /= nl; nz /= nl
    normal[3 * k] = nx; normal[3 * k + 1] = ny; normal[3 * k + 2] = nz
  }
  const box = new Float64Array(6 * nNodes)
  const L = Int32Array.from(left)
  const R = Int32Array.from(right)
  const S = Int32Array.from(start)
  const C = Int32Array.from(count)
  // Pre-order ⇒ children have larger ids: fill boxes from the last node backwards.
  for (let n = nNodes - 1; n >= 0; n--) {
    const b = 6 * n
    box[b] = box[b + 1] = box[b + 2] = Infinity
    box[b + 3] = box[b + 4] = box[b + 5] = -Infinity
    if (L[n] === -1) {
      for (let k = S[n]; k < S[n] + C[n]; k++) {
        for (let v = 0; v < 3; v++) {
          for (let a = 0; a < 3; a++) {
            const x = tri[9 * k + 3 * v + a]
            if (x < box[b + a]) box[b + a] = x
            if (x > box[b + 3 + a]) box[b + 3 + a] = x
          }
        }
      }
    }
    else {
      for (const ch of [L[n], R[n]]) {
        for (let a = 0; a < 3; a++) {
          if (box[6 * ch + a] < box[b + a]) box[b + a] = box[6 * ch + a]
          if (box[6 * ch + 3 + a] > box[b + 3 + a]) box[b + 3 + a] = box[6 * ch + 3 + a]
        }
      }
    }
  }
  geometry.dispose()
  return { mesh, box, left: L, right: R, start: S, count: C, tri, face, normal, buildMs: performance.now() - t0 }
}

/**
 * Cache of contact BVHs. `get(mesh, key?)`: with a key (e.g. a mesh content hash) the BVH is kept
 * under that key (call `delete(key)` or `clear()` to release it); without one it is kept in a
 * WeakMap on the mesh object and released with the mesh.
 */
export class ContactBvhCache {
  private readonly byMesh = new WeakMap<TriMesh, ContactBvh>()
  private readonly byKey = new Map<string, ContactBvh>()
  /** Number of BVHs built by this cache (for tests and benchmarks). */
  builds = 0
  get(mesh: TriMesh, key?: string): ContactBvh {
    const hit = key !== undefined ? this.byKey.get(key) : this.byMesh.get(mesh)
    if (hit && hit.mesh.positions.length === mesh.positions.length && hit.mesh.indices.length === mesh.indices.length) return hit
    const bvh = buildContactBvh(mesh)
    this.builds++
    if (key !== undefined) this.byKey.set(key, bvh)
    else this.byMesh.set(mesh, bvh)
    return bvh
  }

  delete(key: string): void { this.byKey.delete(key) }
  clear(): void { this.byKey.clear() }
}

// ============================================================ exact triangle–triangle distance

/** Scratch results of the primitive distance helpers: closest points p (first), q (second). */
const _cp = new Float64Array(6)

/**
 * Squared distance from point p to triangle (a, b, c) — all given as offsets into flat arrays —
 * with the closest point written to out[o..o+2]. Ericson, Real-Time Collision Detection (2005),
 * §5.1.5 (Voronoi-region walk).
 */
export function pointTriangleDistSq(
  px: number, py: number, pz: number, T: Float64Array, t: number, out: Float64Array, o: number,
): number {
  const ax = T[t], ay = T[t + 1], az = T[t + 2]
  const abx = T[t + 3] - ax, aby = T[t + 4] - ay, abz = T[t + 5] - az
  const acx = T[t + 6] - ax, acy = T[t + 7] - ay, acz = T[t + 8] - az
  const apx = px - ax, apy = py - ay, apz = pz - az
  const d1 = abx * apx + aby * apy + abz * apz
  const d2 = acx * apx + acy * apy + acz * apz
  let qx: number, qy: number, qz: number
  if (d1 <= 0 && d2 <= 0) { qx = ax; qy = ay; qz = az }
  else {
    const bpx = px - T[t + 3], bpy = py - T[t + 4], bpz = pz - T[t + 5]
    const d3 = abx * bpx + aby * bpy + abz * bpz
    const d4 = acx * bpx + acy * bpy + acz * bpz
    if (d3 >= 0 && d4 <= d3) { qx = T[t + 3]; qy = T[t + 4]; qz = T[t + 5] }
    else {
      const vc = d1 * d4 - d3 * d2
      if (vc <= 0 && d1 >= 0 && d3 <= 0) {
        const v = d1 / (d1 - d3)
        qx = ax + v * abx; qy = ay + v * aby; qz = az + v * abz
      }
      else {
        const cpx = px - T[t + 6], cpy = py - T[t + 7], cpz = pz - T[t + 8]
        const d5 = abx * cpx + aby * cpy + abz * cpz
        const d6 = acx * cpx + acy * cpy + acz * cpz
        if (d6 >= 0 && d5 <= d6) { qx = T[t + 6]; qy = T[t + 7]; qz = T[t + 8] }
        else {
          const vb = d5 * d2 - d1 * d6
          if (vb <= 0 && d2 >= 0 && d6 <= 0) {
            const w = d2 / (d2 - d6)
            qx = ax + w * acx; qy = ay + w * acy; qz = az + w * acz
          }
          else {
            const va = d3 * d6 - d5 * d4
            if (va <= 0 && d4 - d3 >= 0 && d5 - d6 >= 0) {
              const w = (d4 - d3) / ((d4 - d3) + (d5 - d6))
              qx = T[t + 3] + w * (T[t + 6] - T[t + 3]); qy = T[t + 4] + w * (T[t + 7] - T[t + 4]); qz = T[t + 5] + w * (T[t + 8] - T[t + 5])
            }
            else {
              const den = 1 / (va + vb + vc)
              const v = vb * den, w = vc * den
              qx = ax + abx * v + acx * w; qy = ay + aby * v + acy * w; qz = az + abz * v + acz * w
            }
          }
        }
      }
    }
  }
  out[o] = qx; out[o + 1] = qy; out[o + 2] = qz
  return (px - qx) ** 2 + (py - qy) ** 2 + (pz - qz) ** 2
}

/**
 * Squared distance between segments P1Q1 and P2Q2 (offsets into flat arrays), closest points to
 * out[0..2] (first segment) and out[3..5]. Ericson (2005) §5.1.9, degenerate segments handled.
 */
export function segmentSegmentDistSq(S1: Float64Array, p1: number, q1: number, S2: Float64Array, p2: number, q2: number, out: Float64Array): number {
  const d1x = S1[q1] - S1[p1], d1y = S1[q1 + 1] - S1[p1 + 1], d1z = S1[q1 + 2] - S1[p1 + 2]
  const d2x = S2[q2] - S2[p2], d2y = S2[q2 + 1] - S2[p2 + 1], d2z = S2[q2 + 2] - S2[p2 + 2]
  const rx = S1[p1] - S2[p2], ry = S1[p1 + 1] - S2[p2 + 1], rz = S1[p1 + 2] - S2[p2 + 2]
  const a = d1x * d1x + d1y * d1y + d1z * d1z
  const e = d2x * d2x + d2y * d2y + d2z * d2z
  const f = d2x * rx + d2y * ry + d2z * rz
  const EPS = 1e-300
  let s: number, t: number
  if (a <= EPS && e <= EPS) { s = 0; t = 0 }
  else if (a <= EPS) { s = 0; t = Math.min(1, Math.max(0, f / e)) }
  else {
    const c = d1x * rx + d1y * ry + d1z * rz
    if (e <= EPS) { t = 0; s = Math.min(1, Math.max(0, -c / a)) }
    else {
      const b = d1x * d2x + d1y * d2y + d1z * d2z
      const denom = a * e - b * b
      s = denom > 1e-14 * a * e ? Math.min(1, Math.max(0, (b * f - c * e) / denom)) : 0
      t = (b * s + f) / e
      if (t < 0) { t = 0; s = Math.min(1, Math.max(0, -c / a)) }
      else if (t > 1) { t = 1; s = Math.min(1, Math.max(0, (b - c) / a)) }
    }
  }
  out[0] = S1[p1] + d1x * s; out[1] = S1[p1 + 1] + d1y * s; out[2] = S1[p1 + 2] + d1z * s
  out[3] = S2[p2] + d2x * t; out[4] = S2[p2 + 1] + d2y * t; out[5] = S2[p2 + 2] + d2z * t
  return (out[0] - out[3]) ** 2 + (out[1] - out[4]) ** 2 + (out[2] - out[5]) ** 2
}

/** Does segment PQ (offsets into S) cross triangle T (offset t)? Writes the crossing to out[0..2]. */
function segmentCrossesTriangle(S: Float64Array, p: number, q: number, T: Float64Array, t: number, out: Float64Array): boolean {
  const ax = T[t], ay = T[t + 1], az = T[t + 2]
  const e1x = T[t + 3] - ax, e1y = T[t + 4] - ay, e1z = T[t + 5] - az
  const e2x = T[t + 6] - ax, e2y = T[t + 7] - ay, e2z = T[t + 8] - az
  const nx = e1y * e2z - e1z * e2y, ny = e1z * e2x - e1x * e2z, nz = e1x * e2y - e1y * e2x
  const dp = (S[p] - ax) * nx + (S[p + 1] - ay) * ny + (S[p + 2] - az) * nz
  const dq = (S[q] - ax) * nx + (S[q + 1] - ay) * ny + (S[q + 2] - az) * nz
  if ((dp > 0 && dq > 0) || (dp < 0 && dq < 0) || dp === dq) return false
  const s = dp / (dp - dq)
  const x = S[p] + s * (S[q] - S[p]), y = S[p + 1] + s * (S[q + 1] - S[p + 1]), z = S[p + 2] + s * (S[q + 2] - S[p + 2])
  // Barycentric test of the crossing point.
  const wx = x - ax, wy = y - ay, wz = z - az
  const uu = e1x * e1x + e1y * e1y + e1z * e1z, vv = e2x * e2x + e2y * e2y + e2z * e2z, uv = e1x * e2x + e1y * e2y + e1z * e2z
  const wu = wx * e1x + wy * e1y + wz * e1z, wv = wx * e2x + wy * e2y + wz * e2z
  const den = uv * uv - uu * vv
  if (den === 0) return false
  const bu = (uv * wv - vv * wu) / den
  const bv = (uv * wu - uu * wv) / den
  if (bu < 0 || bv < 0 || bu + bv > 1) return false
  out[0] = x; out[1] = y; out[2] = z
  return true
}

const _sx = new Float64Array(3)
const _tmp6 = new Float64Array(6)

/**
 * Exact distance between triangles T1 (offset t1 in A) and T2 (offset t2 in B), 9 coordinates each.
 * Zero when they intersect (an edge of one crosses the other). Otherwise the minimum of the 6
 * vertex–triangle and 9 edge–edge distances, which is exact for disjoint triangles (Ericson 2005
 * §5.1.9 remark; common practice). Closest points to out[0..2] (on T1) and out[3..5] (on T2).
 */
export function triangleTriangleDistance(A: Float64Array, t1: number, B: Float64Array, t2: number, out: Float64Array): number {
  for (let e = 0; e < 3; e++) {
    const p = t1 + 3 * e, q = t1 + 3 * ((e + 1) % 3)
    if (segmentCrossesTriangle(A, p, q, B, t2, _sx)) { out[0] = out[3] = _sx[0]; out[1] = out[4] = _sx[1]; out[2] = out[5] = _sx[2]; return 0 }
    const p2 = t2 + 3 * e, q2 = t2 + 3 * ((e + 1) % 3)
    if (segmentCrossesTriangle(B, p2, q2, A, t1, _sx)) { out[0] = out[3] = _sx[0]; out[1] = out[4] = _sx[1]; out[2] = out[5] = _sx[2]; return 0 }
  }
  let best = Infinity
  for (let v = 0; v < 3; v++) {
    const o1 = t1 + 3 * v
    let d = pointTriangleDistSq(A[o1], A[o1 + 1], A[o1 + 2], B, t2, _tmp6, 3)
    if (d < best) { best = d; out[0] = A[o1]; out[1] = A[o1 + 1]; out[2] = A[o1 + 2]; out[3] = _tmp6[3]; out[4] = _tmp6[4]; out[5] = _tmp6[5] }
    const o2 = t2 + 3 * v
    d = pointTriangleDistSq(B[o2], B[o2 + 1], B[o2 + 2], A, t1, _tmp6, 0)
    if (d < best) { best = d; out[0] = _tmp6[0]; out[1] = _tmp6[1]; out[2] = _tmp6[2]; out[3] = B[o2]; out[4] = B[o2 + 1]; out[5] = B[o2 + 2] }
  }
  for (let i = 0; i < 3; i++) {
    for (let j = 0; j < 3; j++) {
      const d = segmentSegmentDistSq(A, t1 + 3 * i, t1 + 3 * ((i + 1) % 3), B, t2 + 3 * j, t2 + 3 * ((j + 1) % 3), _tmp6)
      if (d < best) { best = d; for (let k = 0; k < 6; k++) out[k] = _tmp6[k] }
    }
  }
  return Math.sqrt(best)
}

// ============================================================ rigid placement of B

/**
 * B rotated into A's axes once per query: triangle coordinates R·x and node boxes refitted tightly
 * around the rotated triangles (same tree topology). Placing B then only adds a translation t:
 * x_A = R x_B + t.
 */
interface RotatedB { bvh: ContactBvh, tri: Float64Array, box: Float64Array }

function rotateB(bvh: ContactBvh, R: Mat3): RotatedB {
  const T = bvh.tri
  const tri = new Float64Array(T.length)
  const [r0, r1, r2] = R
  for (let i = 0; i < T.length; i += 3) {
    const x = T[i], y = T[i + 1], z = T[i + 2]
    tri[i] = r0[0] * x + r0[1] * y + r0[2] * z
    tri[i + 1] = r1[0] * x + r1[1] * y + r1[2] * z
    tri[i + 2] = r2[0] * x + r2[1] * y + r2[2] * z
  }
  const n = bvh.left.length
  const box = new Float64Array(6 * n)
  const L = bvh.left, Rr = bvh.right, S = bvh.start, C = bvh.count
  for (let k = n - 1; k >= 0; k--) {
    const b = 6 * k
    let x0 = Infinity, y0 = Infinity, z0 = Infinity, x1 = -Infinity, y1 = -Infinity, z1 = -Infinity
    if (L[k] === -1) {
      for (let i = 9 * S[k]; i < 9 * (S[k] + C[k]); i += 3) {
        const x = tri[i], y = tri[i + 1], z = tri[i + 2]
        if (x < x0) x0 = x; if (x > x1) x1 = x
        if (y < y0) y0 = y; if (y > y1) y1 = y
        if (z < z0) z0 = z; if (z > z1) z1 = z
      }
    }
    else {
      for (const c of [6 * L[k], 6 * Rr[k]]) {
        if (box[c] < x0) x0 = box[c]; if (box[c + 1] < y0) y0 = box[c + 1]; if (box[c + 2] < z0) z0 = box[c + 2]
        if (box[c + 3] > x1) x1 = box[c + 3]; if (box[c + 4] > y1) y1 = box[c + 4]; if (box[c + 5] > z1) z1 = box[c + 5]
      }
    }
    box[b] = x0; box[b + 1] = y0; box[b + 2] = z0; box[b + 3] = x1; box[b + 4] = y1; box[b + 5] = z1
  }
  return { bvh, tri, box }
}

/** Box of rotated B node n translated by t, into out[0..5]. */
function placedBox(rb: RotatedB, n: number, t: Float64Array, out: Float64Array): void {
  const b = rb.box, o = 6 * n
  out[0] = b[o] + t[0]; out[1] = b[o + 1] + t[1]; out[2] = b[o + 2] + t[2]
  out[3] = b[o + 3] + t[0]; out[4] = b[o + 4] + t[1]; out[5] = b[o + 5] + t[2]
}

/** Rotated B triangles [k0, k0+n) translated by t, into `out`. */
function placeTriangles(rb: RotatedB, k0: number, n: number, t: Float64Array, out: Float64Array): void {
  const T = rb.tri
  for (let v = 0; v < 3 * n; v++) {
    const s = 9 * k0 + 3 * v
    out[3 * v] = T[s] + t[0]
    out[3 * v + 1] = T[s + 1] + t[1]
    out[3 * v + 2] = T[s + 2] + t[2]
  }
}

function boxDistance(a: Float64Array, oa: number, b: Float64Array, ob: number): number {
  let s = 0
  for (let i = 0; i < 3; i++) {
    const g = Math.max(b[ob + i] - a[oa + 3 + i], a[oa + i] - b[ob + 3 + i], 0)
    s += g * g
  }
  return Math.sqrt(s)
}

/** Grow-on-demand stack/heap storage. */
class PairStack {
  a = new Int32Array(1024)
  b = new Int32Array(1024)
  key = new Float64Array(1024)
  n = 0
  push(x: number, y: number, k: number): void {
    if (this.n === this.a.length) {
      const grow = <T extends Int32Array | Float64Array>(arr: T): T => { const g = new (arr.constructor as any)(arr.length * 2); g.set(arr); return g }
      this.a = grow(this.a); this.b = grow(this.b); this.key = grow(this.key)
    }
    this.a[this.n] = x; this.b[this.n] = y; this.key[this.n] = k; this.n++
  }
}

/** Binary min-heap of node pairs keyed by a float. */
class PairHeap extends PairStack {
  pushHeap(x: number, y: number, k: number): void {
    this.push(x, y, k)
    let i = this.n - 1
    const { a, b, key } = this
    while (i > 0) {
      const p = (i - 1) >> 1
      if (key[p] <= key[i]) break
      const ta = a[p]; a[p] = a[i]; a[i] = ta
      const tb = b[p]; b[p] = b[i]; b[i] = tb
      const tk = key[p]; key[p] = key[i]; key[i] = tk
      i = p
    }
  }

  /** Pops the minimum into `popped` = [a, b] and returns its key. */
  pop(popped: Int32Array): number {
    const { a, b, key } = this
    const k0 = key[0]
    popped[0] = a[0]; popped[1] = b[0]
    this.n--
    if (this.n > 0) {
      a[0] = a[this.n]; b[0] = b[this.n]; key[0] = key[this.n]
      let i = 0
      for (;;) {
        const l = 2 * i + 1, r = l + 1
        let m = i
        if (l < this.n && key[l] < key[m]) m = l
        if (r < this.n && key[r] < key[m]) m = r
        if (m === i) break
        const ta = a[m]; a[m] = a[i]; a[i] = ta
        const tb = b[m]; b[m] = b[i]; b[i] = tb
        const tk = key[m]; key[m] = key[i]; key[i] = tk
        i = m
      }
    }
    return k0
  }
}

function nodeSize(bvh: ContactBvh, n: number): number {
  const b = bvh.box, o = 6 * n
  return (b[o + 3] - b[o]) + (b[o + 4] - b[o + 1]) + (b[o + 5] - b[o + 2])
}

// ============================================================ exact mesh–mesh distance

export interface MeshDistanceResult {
  /** Smallest triangle–triangle distance found, m (exact minimum when `lowerBound === distance`). */
  distance: number
  /** Certified lower bound of the surface distance, m (equals `distance` unless the pair budget ran out). */
  lowerBound: number
  /** Closest points found, A's file frame, m. */
  pointA: Vec3
  pointB: Vec3
  /** Original face indices of the closest triangles found (−1 if none examined). */
  faceA: number
  faceB: number
  /** Node pairs visited (diagnostics). */
  pairsVisited: number
}

const _boxB = new Float64Array(6)
const _leafB = new Float64Array(9 * 64)

/**
 * Distance between the SURFACES of mesh A (its file frame) and mesh B placed by x_A = R x_B + t:
 * best-first dual-BVH traversal keyed by the AABB distance of node pairs, exact triangle–triangle
 * distance at leaf pairs. Stops when the smallest key left is ≥ the best distance found (exact
 * result), or after `maxPairs` node pairs, returning the smallest key left as a certified lower
 * bound. Note: a lobe wholly inside the other has positive surface distance.
 */
export function meshDistance(bvhA: ContactBvh, bvhB: ContactBvh, R: Mat3, t: Vec3, maxPairs = Infinity): MeshDistanceResult {
  return meshDistanceRotated(bvhA, rotateB(bvhB, R), t, maxPairs)
}

function meshDistanceRotated(bvhA: ContactBvh, rb: RotatedB, tIn: Vec3, maxPairs = Infinity): MeshDistanceResult {
  const bvhB = rb.bvh
  const P = Float64Array.from(tIn)
  const heap = new PairHeap()
  const popped = new Int32Array(2)
  let best = Infinity
  const bestPts = new Float64Array(6)
  let faceA = -1, faceB = -1, visited = 0
  let lower = Infinity
  const out = new Float64Array(6)
  placedBox(rb, 0, P, _boxB)
  heap.pushHeap(0, 0, boxDistance(bvhA.box, 0, _boxB, 0))
  while (heap.n > 0) {
    if (heap.key[0] >= best) break
    if (visited >= maxPairs) { lower = heap.key[0]; break }
    heap.pop(popped)
    visited++
    const na = popped[0], nb = popped[1]
    const leafA = bvhA.left[na] === -1, leafB = bvhB.left[nb] === -1
    if (leafA && leafB) {
      const cb = bvhB.count[nb], kb = bvhB.start[nb]
      placeTriangles(rb, kb, cb, P, _leafB)
      for (let ia = 0; ia < bvhA.count[na]; ia++) {
        const ka = bvhA.start[na] + ia
        for (let ib = 0; ib < cb; ib++) {
          const d = triangleTriangleDistance(bvhA.tri, 9 * ka, _leafB, 9 * ib, out)
          if (d < best) { best = d; bestPts.set(out); faceA = bvhA.face[ka]; faceB = bvhB.face[kb + ib] }
        }
      }
      continue
    }
    // Split the larger node of the pair.
    const splitA = !leafA && (leafB || nodeSize(bvhA, na) >= nodeSize(bvhB, nb))
    for (let c = 0; c < 2; c++) {
      const ca = splitA ? (c ? bvhA.right[na] : bvhA.left[na]) : na
      const cbn = splitA ? nb : (c ? bvhB.right[nb] : bvhB.left[nb])
      placedBox(rb, cbn, P, _boxB)
      const l = boxDistance(bvhA.box, 6 * ca, _boxB, 0)
      if (l < best) heap.pushHeap(ca, cbn, l)
    }
  }
  return {
    distance: best,
    lowerBound: Math.min(lower, best),
    pointA: [bestPts[0], bestPts[1], bestPts[2]],
    pointB: [bestPts[3], bestPts[4], bestPts[5]],
    faceA,
    faceB,
    pairsVisited: visited,
  }
}

// ============================================================ exact translational time of impact

/**
 * Smallest t ∈ [0, tMax] at which ray o + t·w meets triangle T (offset t0), two-sided,
 * boundary included with a relative tolerance (Möller & Trumbore 1997). Infinity if none.
 */
function rayTriangle(ox: number, oy: number, oz: number, wx: number, wy: number, wz: number, T: Float64Array, t0: number, tMax: number): number {
  const ax = T[t0], ay = T[t0 + 1], az = T[t0 + 2]
  const e1x = T[t0 + 3] - ax, e1y = T[t0 + 4] - ay, e1z = T[t0 + 5] - az
  const e2x = T[t0 + 6] - ax, e2y = T[t0 + 7] - ay, e2z = T[t0 + 8] - az
  const px = wy * e2z - wz * e2y, py = wz * e2x - wx * e2z, pz = wx * e2y - wy * e2x
  const det = e1x * px + e1y * py + e1z * pz
  const scaleSq = (e1x * e1x + e1y * e1y + e1z * e1z) * (e2x * e2x + e2y * e2y + e2z * e2z)
  if (det * det <= 1e-24 * scaleSq) return Infinity
  const inv = 1 / det
  const sx = ox - ax, sy = oy - ay, sz = oz - az
  const u = (sx * px + sy * py + sz * pz) * inv
  const EPS = 1e-12
  if (u < -EPS || u > 1 + EPS) return Infinity
  const qx = sy * e1z - sz * e1y, qy = sz * e1x - sx * e1z, qz = sx * e1y - sy * e1x
  const v = (wx * qx + wy * qy + wz * qz) * inv
  if (v < -EPS || u + v > 1 + EPS) return Infinity
  const t = (e2x * qx + e2y * qy + e2z * qz) * inv
  return t >= 0 && t <= tMax ? t : Infinity
}

/** TOI of edge A: a + s·e1 against edge B: b + r·e2 moving by t·w; Infinity if none in [0, tMax]. */
function edgeEdgeTOI(A: Float64Array, pa: number, qa: number, B: Float64Array, pb: number, qb: number, wx: number, wy: number, wz: number, tMax: number, out: Float64Array): number {
  // Solve s·e1 − r·e2 − t·w = b − a.
  const e1x = A[qa] - A[pa], e1y = A[qa + 1] - A[pa + 1], e1z = A[qa + 2] - A[pa + 2]
  const e2x = B[pb] - B[qb], e2y = B[pb + 1] - B[qb + 1], e2z = B[pb + 2] - B[qb + 2] // −e2
  const mx = -wx, my = -wy, mz = -wz
  const rx = B[pb] - A[pa], ry = B[pb + 1] - A[pa + 1], rz = B[pb + 2] - A[pa + 2]
  const c1x = e2y * mz - e2z * my, c1y = e2z * mx - e2x * mz, c1z = e2x * my - e2y * mx
  const det = e1x * c1x + e1y * c1y + e1z * c1z
  const l1 = e1x * e1x + e1y * e1y + e1z * e1z, l2 = e2x * e2x + e2y * e2y + e2z * e2z
  if (det * det <= 1e-20 * l1 * l2) return Infinity
  const inv = 1 / det
  const s = (rx * c1x + ry * c1y + rz * c1z) * inv
  if (s < -1e-12 || s > 1 + 1e-12) return Infinity
  const c2x = ry * mz - rz * my, c2y = rz * mx - rx * mz, c2z = rx * my - ry * mx
  const r = (e1x * c2x + e1y * c2y + e1z * c2z) * inv
  if (r < -1e-12 || r > 1 + 1e-12) return Infinity
  const c3x = e2y * rz - e2z * ry, c3y = e2z * rx - e2x * rz, c3z = e2x * ry - e2y * rx
  const t = (e1x * c3x + e1y * c3y + e1z * c3z) * inv
  if (!(t >= 0 && t <= tMax)) return Infinity
  out[0] = A[pa] + s * e1x; out[1] = A[pa + 1] + s * e1y; out[2] = A[pa + 2] + s * e1z
  return t
}

const _pt = new Float64Array(3)

/**
 * Time of impact of triangle T2 (moving by t·w) against static T1, t ∈ [0, tMax]; contact point
 * (at the impact, A's frame) to out[0..2]. Infinity if they do not meet.
 */
export function triangleTriangleTOI(A: Float64Array, t1: number, B: Float64Array, t2: number, wx: number, wy: number, wz: number, tMax: number, out: Float64Array): number {
  let best = Infinity
  for (let v = 0; v < 3; v++) {
    const ob = t2 + 3 * v
    let t = rayTriangle(B[ob], B[ob + 1], B[ob + 2], wx, wy, wz, A, t1, Math.min(tMax, best))
    if (t < best) { best = t; out[0] = B[ob] + t * wx; out[1] = B[ob + 1] + t * wy; out[2] = B[ob + 2] + t * wz }
    const oa = t1 + 3 * v
    t = rayTriangle(A[oa], A[oa + 1], A[oa + 2], -wx, -wy, -wz, B, t2, Math.min(tMax, best))
    if (t < best) { best = t; out[0] = A[oa]; out[1] = A[oa + 1]; out[2] = A[oa + 2] }
  }
  for (let i = 0; i < 3; i++) {
    for (let j = 0; j < 3; j++) {
      const t = edgeEdgeTOI(A, t1 + 3 * i, t1 + 3 * ((i + 1) % 3), B, t2 + 3 * j, t2 + 3 * ((j + 1) % 3), wx, wy, wz, Math.min(tMax, best), _pt)
      if (t < best) { best = t; out[0] = _pt[0]; out[1] = _pt[1]; out[2] = _pt[2] }
    }
  }
  return best
}

/** Entry time of box B (moving by t·w) into box A, within [0, tMax]; Infinity if it never enters. */
function sweptBoxEntry(a: Float64Array, oa: number, b: Float64Array, w: Float64Array, tMax: number): number {
  let lo = 0, hi = tMax
  for (let i = 0; i < 3; i++) {
    // Overlap on axis i when b_lo + t w ≤ a_hi and b_hi + t w ≥ a_lo.
    const wi = w[i]
    if (wi === 0) {
      if (b[i] > a[oa + 3 + i] || b[3 + i] < a[oa + i]) return Infinity
      continue
    }
    let t0 = (a[oa + i] - b[3 + i]) / wi
    let t1 = (a[oa + 3 + i] - b[i]) / wi
    if (t0 > t1) { const s = t0; t0 = t1; t1 = s }
    if (t0 > lo) lo = t0
    if (t1 < hi) hi = t1
    if (lo > hi) return Infinity
  }
  return lo
}

interface ToiEvent { t: number, point: Vec3, leafA: number, leafB: number }

/**
 * Exact first contact time of B (placed by P) moving by t·w (unit w) against static A, t ∈ [0, tMax],
 * best-first over node pairs by swept-box entry time. Returns all pair events within `tieTol` of
 * the minimum (several when the touch is at a vertex, an edge or a face patch).
 */
function sweepTOI(bvhA: ContactBvh, rb: RotatedB, P: Float64Array, w: Vec3, tMax: number, tieTol: number): { t: number, events: ToiEvent[], pairsVisited: number } {
  const W = Float64Array.from(w)
  const heap = new PairHeap()
  const popped = new Int32Array(2)
  const out = new Float64Array(3)
  let best = Infinity
  let events: ToiEvent[] = []
  let visited = 0
  const bvhB = rb.bvh
  placedBox(rb, 0, P, _boxB)
  const e0 = sweptBoxEntry(bvhA.box, 0, _boxB, W, tMax)
  if (e0 !== Infinity) heap.pushHeap(0, 0, e0)
  while (heap.n > 0) {
    const key = heap.pop(popped)
    if (key > best + tieTol) break
    visited++
    const na = popped[0], nb = popped[1]
    const leafA = bvhA.left[na] === -1, leafB = bvhB.left[nb] === -1
    if (leafA && leafB) {
      const cb = bvhB.count[nb], kb = bvhB.start[nb]
      placeTriangles(rb, kb, cb, P, _leafB)
      for (let ia = 0; ia < bvhA.count[na]; ia++) {
        const ka = bvhA.start[na] + ia
        for (let ib = 0; ib < cb; ib++) {
          const t = triangleTriangleTOI(bvhA.tri, 9 * ka, _leafB, 9 * ib, W[0], W[1], W[2], Math.min(tMax, best + tieTol), out)
          if (t === Infinity) continue
          if (t < best - tieTol) events = events.filter(e => e.t <= t + tieTol)
          if (t < best) best = t
          if (t <= best + tieTol) events.push({ t, point: [out[0], out[1], out[2]], leafA: ka, leafB: kb + ib })
        }
      }
      continue
    }
    const splitA = !leafA && (leafB || nodeSize(bvhA, na) >= nodeSize(bvhB, nb))
    const kids: [number, number][] = splitA
      ? [[bvhA.left[na], nb], [bvhA.right[na], nb]]
      : [[na, bvhB.left[nb]], [na, bvhB.right[nb]]]
    for (const [ca, cb] of kids) {
      placedBox(rb, cb, P, _boxB)
      const e = sweptBoxEntry(bvhA.box, 6 * ca, _boxB, W, Math.min(tMax, best + tieTol))
      if (e !== Infinity) heap.pushHeap(ca, cb, e)
    }
  }
  events = events.filter(e => e.t <= best + tieTol)
  return { t: best, events, pairsVisited: visited }
}

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
 * @throws GeometryError('BAD_MESH') for malformed meshes, ('ZERO_VECTOR') for a zero direction,
 *   ('NO_CONTACT') when B can travel through A's centroid without touching (cannot happen for
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
  if (sw.t === Infinity) throw new GeometryError('NO_CONTACT', 'firstContact: the lobes never touch along this line (are the meshes closed and around their centroids?)')
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
