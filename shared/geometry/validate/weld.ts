/**
 * Vertex welding and the face remap of `validateMesh`: weld within tolerance, drop collapsed and
 * zero-area triangles, renumber the used vertices.
 */
import { MAX_LISTED } from '../types'

/**
 * Renumber the vertices that some face uses, keeping their order, and rewrite I in place.
 * Returns used (old → new index, −1 when unused; null when all are used: the identity) and the
 * number of used vertices.
 */
export function renumberUsed(I: Uint32Array, corners: VertexCorners): { used: Int32Array | null, count: number } {
  const { count: deg, firstFace } = corners
  const nv = deg.length
  let count = 0
  for (let v = 0; v < nv; v++) if (deg[v]! > 0) count++
  // renumbering keeps the vertex order, so with no unreferenced vertices it is the identity
  if (count === nv) return { used: null, count }
  const used = new Int32Array(nv)
  count = 0
  for (let v = 0; v < nv; v++) used[v] = deg[v]! > 0 ? count++ : -1
  for (let i = 0; i < I.length; i++) I[i] = used[I[i]!]!
  // the per-vertex tables follow the new numbering
  for (let v = 0; v < nv; v++) if (used[v]! >= 0) { deg[used[v]!] = deg[v]!; firstFace[used[v]!] = firstFace[v]! }
  corners.count = deg.subarray(0, count)
  corners.firstFace = firstFace.subarray(0, count)
  return { used, count }
}

export interface VertexCorners {
  /** Face corners at each vertex (0: unreferenced). */
  count: Uint32Array
  /** First face that uses each vertex (meaningless where count is 0). */
  firstFace: Int32Array
}

/**
 * Weld vertices closer than `tol` (m): spatial hash with cells of max(8·tol, 1e-9·diag); a vertex
 * is compared with the representatives in its cell and, when it lies within tol of a cell face,
 * the neighbouring cells. Returns map (old → new index), count, reps (new → old representative).
 */
export function weld(P: Float64Array, nv: number, minx: number, miny: number, minz: number, diag: number, tol: number) {
  const map = new Uint32Array(nv)
  const reps = new Uint32Array(nv)
  const C = Math.max(8 * tol, 1e-9 * diag) || 1
  let cap = 1
  while (cap < 2 * nv) cap <<= 1
  const mask = cap - 1
  const kx = new Int32Array(cap), ky = new Int32Array(cap), kz = new Int32Array(cap)
  const head = new Int32Array(cap).fill(-1)
  const next = new Int32Array(nv) // chain of representatives per cell (new indices)
  const tol2 = tol * tol
  const r = tol / C
  let count = 0
  const find = (ix: number, iy: number, iz: number): number => {
    let h = (Math.imul(ix, 73856093) ^ Math.imul(iy, 19349663) ^ Math.imul(iz, 83492791)) & mask
    for (;;) {
      if (head[h] === -1 || (kx[h] === ix && ky[h] === iy && kz[h] === iz)) return h
      h = (h + 1) & mask
    }
  }
  for (let v = 0; v < nv; v++) {
    const x = P[3 * v]!, y = P[3 * v + 1]!, z = P[3 * v + 2]!
    const fx = (x - minx) / C, fy = (y - miny) / C, fz = (z - minz) / C
    const ix = Math.floor(fx), iy = Math.floor(fy), iz = Math.floor(fz)
    let found = -1
    const x0 = Math.floor(fx - r), x1 = Math.floor(fx + r)
    const y0 = Math.floor(fy - r), y1 = Math.floor(fy + r)
    const z0 = Math.floor(fz - r), z1 = Math.floor(fz + r)
    search:
    for (let ax = x0; ax <= x1; ax++) {
      for (let ay = y0; ay <= y1; ay++) {
        for (let az = z0; az <= z1; az++) {
          const h = find(ax, ay, az)
          for (let u = head[h]!; u !== -1; u = next[u]!) {
            const q = 3 * reps[u]!
            const dx = P[q]! - x, dy = P[q + 1]! - y, dz = P[q + 2]! - z
            if (dx * dx + dy * dy + dz * dz <= tol2) { found = u; break search }
          }
        }
      }
    }
    if (found >= 0) { map[v] = found; continue }
    const u = count++
    reps[u] = v
    map[v] = u
    const h = find(ix, iy, iz)
    if (head[h] === -1) { kx[h] = ix; ky[h] = iy; kz[h] = iz }
    next[u] = head[h]!
    head[h] = u
  }
  return { map, count, reps }
}

/**
 * Face remap after welding (weldMap null: no weld, indices kept). Drops collapsed triangles and
 * zero-area ones: |u × v|² ≤ 1e-24 · (longest edge)⁴, i.e. sin of the largest angle below 1e-12
 * (common practice, no source). Lists the first few dropped input triangles in `degFaces`.
 * Also counts the kept faces' corners per vertex (nv: vertex count after welding) and sums the
 * kept faces' `addTriple` about center in face order (volSum, m³ × 6), which is the volume sum of
 * `componentVolumes` when nothing is flipped and there is one component.
 */
export function remapFaces(P0: Float64Array, I0: Uint32Array, weldMap: Uint32Array | null, reps: Uint32Array | null, nv: number, center: Float64Array, degFaces: number[]) {
  const nf0 = I0.length / 3
  const r: RemapState = {
    P0, I0, weldMap, reps, center, degFaces,
    I: new Uint32Array(I0.length),
    faceOrigin: new Uint32Array(nf0),
    corners: { count: new Uint32Array(nv), firstFace: new Int32Array(nv) },
    nf: 0,
    volSum: 0,
  }
  for (let f = 0; f < nf0; f += FACE_BLOCK) remapBlock(r, f, Math.min(nf0, f + FACE_BLOCK))
  let { I, faceOrigin } = r
  const { nf, corners, volSum } = r
  if (nf < nf0 && nf > 0) { I = I.slice(0, 3 * nf); faceOrigin = faceOrigin.slice(0, nf) }
  return { I, faceOrigin, nf, corners, volSum }
}

/** Faces per call of `remapBlock` (called per block so that V8 optimises it early, as `boundsBlock`). */
const FACE_BLOCK = 16384

interface RemapState {
  P0: Float64Array
  I0: Uint32Array
  weldMap: Uint32Array | null
  reps: Uint32Array | null
  /** Bounding-box centre, m. */
  center: Float64Array
  degFaces: number[]
  I: Uint32Array
  faceOrigin: Uint32Array
  corners: VertexCorners
  /** Faces kept so far. */
  nf: number
  /** Running volume sum (see `remapFaces`), m³ × 6. */
  volSum: number
}

/** Input faces from .. to−1 of `remapFaces`. */
function remapBlock(r: RemapState, from: number, to: number): void {
  const { P0, I0, weldMap, reps, degFaces, I, faceOrigin } = r
  const { count, firstFace } = r.corners
  const cx = r.center[0]!, cy = r.center[1]!, cz = r.center[2]!
  let nf = r.nf, volSum = r.volSum
  for (let f = from; f < to; f++) {
    let a = I0[3 * f]!, b = I0[3 * f + 1]!, c = I0[3 * f + 2]!
    if (weldMap) { a = weldMap[a]!; b = weldMap[b]!; c = weldMap[c]! }
    const ra = reps ? reps[a]! : a, rb = reps ? reps[b]! : b, rc = reps ? reps[c]! : c
    if (a === b || b === c || c === a) { if (degFaces.length < MAX_LISTED) degFaces.push(f); continue }
    // zero area: |u × v|² ≤ 1e-24 · (longest edge)⁴ (u, v: the edges from a)
    const pa = 3 * ra, pb = 3 * rb, pc = 3 * rc
    const ax = P0[pa]!, ay = P0[pa + 1]!, az = P0[pa + 2]!
    const ux = P0[pb]! - ax, uy = P0[pb + 1]! - ay, uz = P0[pb + 2]! - az
    const vx = P0[pc]! - ax, vy = P0[pc + 1]! - ay, vz = P0[pc + 2]! - az
    const wx = vx - ux, wy = vy - uy, wz = vz - uz
    const nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx
    const e2 = Math.max(ux * ux + uy * uy + uz * uz, vx * vx + vy * vy + vz * vz, wx * wx + wy * wy + wz * wz)
    if (nx * nx + ny * ny + nz * nz <= 1e-24 * e2 * e2) { if (degFaces.length < MAX_LISTED) degFaces.push(f); continue }
    volSum = addTriple(volSum, P0, pa, pb, pc, cx, cy, cz)
    I[3 * nf] = a; I[3 * nf + 1] = b; I[3 * nf + 2] = c
    faceOrigin[nf] = f
    if (count[a]!++ === 0) firstFace[a] = nf
    if (count[b]!++ === 0) firstFace[b] = nf
    if (count[c]!++ === 0) firstFace[c] = nf
    nf++
  }
  r.nf = nf
  r.volSum = volSum
}

/**
 * acc + the triple product (a − c)·((b − a) × (q − a)) of the points at offsets a, b, q of P, with
 * c = (cx, cy, cz), m³ (= (a − c)·((b − c) × (q − c)), with the small edge vectors formed first);
 * one rounding order shared by every volume sum here.
 */
export function addTriple(acc: number, P: Float64Array, a: number, b: number, q: number, cx: number, cy: number, cz: number): number {
  const ax = P[a]!, ay = P[a + 1]!, az = P[a + 2]!
  const ux = P[b]! - ax, uy = P[b + 1]! - ay, uz = P[b + 2]! - az
  const vx = P[q]! - ax, vy = P[q + 1]! - ay, vz = P[q + 2]! - az
  return acc + (ax - cx) * (uy * vz - uz * vy) + (ay - cy) * (uz * vx - ux * vz) + (az - cz) * (ux * vy - uy * vx)
}
