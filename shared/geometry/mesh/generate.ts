/**
 * Deterministic mesh generators and simple mesh transforms.
 *
 * Every generator returns a closed, consistently oriented TriMesh with counter-clockwise winding
 * seen from outside (outward normals by the right-hand rule), in metres. Output depends only on
 * the arguments (no Math.random), so meshes can be regenerated bit-for-bit in tests and benches.
 */
import type { Mat3, Quat, TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import { quatToMat3 } from '../math/linalg'
import { seededRandom } from '../math/rng'

const PHI = (1 + Math.sqrt(5)) / 2

// Regular icosahedron (Kahler's vertex/face layout), faces CCW seen from outside.
const ICO_V = [
  -1, PHI, 0, 1, PHI, 0, -1, -PHI, 0, 1, -PHI, 0,
  0, -1, PHI, 0, 1, PHI, 0, -1, -PHI, 0, 1, -PHI,
  PHI, 0, -1, PHI, 0, 1, -PHI, 0, -1, -PHI, 0, 1,
]
const ICO_F = [
  0, 11, 5, 0, 5, 1, 0, 1, 7, 0, 7, 10, 0, 10, 11,
  1, 5, 9, 5, 11, 4, 11, 10, 2, 10, 7, 6, 7, 1, 8,
  3, 9, 4, 3, 4, 2, 3, 2, 6, 3, 6, 8, 3, 8, 9,
  4, 9, 5, 2, 4, 11, 6, 2, 10, 8, 6, 7, 9, 8, 1,
]

/** Cache of unit icosphere directions per subdivision level (positions are never handed out directly). */
const unitCache = new Map<number, TriMesh>()

function checkInt(name: string, v: number, lo: number, hi: number): void {
  if (!Number.isInteger(v) || v < lo || v > hi) {
    throw new GeometryError('bad-argument', `${name} must be an integer in [${lo}, ${hi}], got ${v}`)
  }
}
function checkPositive(name: string, v: number): void {
  if (!(v > 0) || !Number.isFinite(v)) throw new GeometryError('bad-argument', `${name} must be a positive finite number, got ${v}`)
}

/**
 * Unit icosphere: vertices on the unit sphere, 20·4^n faces, 10·4^n + 2 vertices.
 * Midpoints are found with an open-addressing hash on packed (lo, hi) edge keys, no strings.
 */
function unitIcosphere(n: number): TriMesh {
  const cached = unitCache.get(n)
  if (cached) return cached
  let pos = new Float64Array(ICO_V.length)
  for (let i = 0; i < ICO_V.length; i += 3) {
    const x = ICO_V[i]!, y = ICO_V[i + 1]!, z = ICO_V[i + 2]!
    const r = Math.hypot(x, y, z)
    pos[i] = x / r; pos[i + 1] = y / r; pos[i + 2] = z / r
  }
  let idx = Uint32Array.from(ICO_F)
  for (let level = 0; level < n; level++) {
    const nf = idx.length / 3
    const nv = pos.length / 3
    const ne = (nf * 3) / 2
    const newPos = new Float64Array((nv + ne) * 3)
    newPos.set(pos)
    const newIdx = new Uint32Array(nf * 4 * 3)
    // hash table of edges: capacity power of two ≥ 2·ne
    let cap = 1
    while (cap < ne * 2) cap <<= 1
    const mask = cap - 1
    const keyLo = new Int32Array(cap).fill(-1)
    const keyHi = new Int32Array(cap)
    const val = new Uint32Array(cap)
    let next = nv
    const mid = (a: number, b: number): number => {
      const lo = a < b ? a : b
      const hi = a < b ? b : a
      let h = (Math.imul(lo, 0x9e3779b1) ^ Math.imul(hi, 0x85ebca77)) & mask
      for (;;) {
        const k = keyLo[h]!
        if (k === -1) break
        if (k === lo && keyHi[h] === hi) return val[h]!
        h = (h + 1) & mask
      }
      const m = next++
      keyLo[h] = lo; keyHi[h] = hi; val[h] = m
      let x = pos[3 * lo]! + pos[3 * hi]!
      let y = pos[3 * lo + 1]! + pos[3 * hi + 1]!
      let z = pos[3 * lo + 2]! + pos[3 * hi + 2]!
      const r = Math.sqrt(x * x + y * y + z * z)
      x /= r; y /= r; z /= r
      newPos[3 * m] = x; newPos[3 * m + 1] = y; newPos[3 * m + 2] = z
      return m
    }
    for (let f = 0; f < nf; f++) {
      const a = idx[3 * f]!, b = idx[3 * f + 1]!, c = idx[3 * f + 2]!
      const ab = mid(a, b), bc = mid(b, c), ca = mid(c, a)
      const o = 12 * f
      newIdx[o] = a; newIdx[o + 1] = ab; newIdx[o + 2] = ca
      newIdx[o + 3] = b; newIdx[o + 4] = bc; newIdx[o + 5] = ab
      newIdx[o + 6] = c; newIdx[o + 7] = ca; newIdx[o + 8] = bc
      newIdx[o + 9] = ab; newIdx[o + 10] = bc; newIdx[o + 11] = ca
    }
    pos = newPos
    idx = newIdx
  }
  const mesh = { positions: pos, indices: idx }
  // keep only small levels cached: big ones would pin memory
  if (n <= 6) unitCache.set(n, mesh)
  return mesh
}

/**
 * One closed body made of two overlapping spheres: radius r1 centred at the origin and r2 centred
 * at (d, 0, 0), |r1 − r2| < d < r1 + r2. A surface of revolution about x whose profile follows
 * sphere 1 from x = −r1 to the intersection circle at x_i = (d² + r1² − r2²)/(2d), then sphere 2
 * to x = d + r2, with `around` segments per ring and arc steps of about the same angle; the
 * intersection circle is a ring of vertices. Inscribed, so the volume is low by about
 * (2π/around)²/6 relative. (A boolean union of two icospheres leaves zero-area slivers along
 * the intersection curve instead.)
 * @throws GeometryError 'bad-argument' when the spheres do not overlap or around < 3.
 */
export function twoSphereBody(r1: number, r2: number, d: number, around: number): TriMesh {
  if (!(r1 > 0 && r2 > 0 && d > Math.abs(r1 - r2) && d < r1 + r2) || !Number.isInteger(around) || around < 3) {
    throw new GeometryError('bad-argument', 'twoSphereBody needs overlapping spheres (|r1 − r2| < d < r1 + r2) and at least 3 segments')
  }
  const xi = (d * d + r1 * r1 - r2 * r2) / (2 * d)
  const step = 2 * Math.PI / around
  const prof: [number, number][] = []
  const t1 = Math.acos(xi / r1)
  const t2 = Math.acos((xi - d) / r2)
  const n1 = Math.ceil((Math.PI - t1) / step)
  const n2 = Math.ceil(t2 / step)
  for (let k = 1; k <= n1; k++) {
    const t = Math.PI - (Math.PI - t1) * k / n1
    prof.push([r1 * Math.cos(t), r1 * Math.sin(t)])
  }
  for (let k = 1; k < n2; k++) {
    const t = t2 - t2 * k / n2
    prof.push([d + r2 * Math.cos(t), r2 * Math.sin(t)])
  }
  const pos: number[] = [-r1, 0, 0]
  for (const [x, r] of prof) for (let j = 0; j < around; j++) pos.push(x, r * Math.cos(j * step), r * Math.sin(j * step))
  pos.push(d + r2, 0, 0)
  const last = pos.length / 3 - 1
  const ring = (k: number, j: number) => 1 + k * around + (j % around)
  const idx: number[] = []
  for (let j = 0; j < around; j++) {
    idx.push(0, ring(0, j + 1), ring(0, j))
    for (let k = 0; k + 1 < prof.length; k++) idx.push(ring(k, j), ring(k, j + 1), ring(k + 1, j + 1), ring(k, j), ring(k + 1, j + 1), ring(k + 1, j))
    idx.push(last, ring(prof.length - 1, j), ring(prof.length - 1, j + 1))
  }
  return { positions: new Float64Array(pos), indices: new Uint32Array(idx) }
}

/**
 * Icosphere of the given radius (m) centred at `center` (default origin): 20·4^subdivisions faces
 * (subdivisions 8 → 1 310 720 faces), 10·4^subdivisions + 2 vertices, all on the sphere (the mesh
 * is inscribed, so its volume is slightly below 4πR³/3, by O(h²)).
 * @throws GeometryError 'bad-argument' for subdivisions outside 0..9 or a non-positive radius.
 */
export function icosphere(subdivisions: number, radius = 1, center: Vec3 = [0, 0, 0]): TriMesh {
  return ellipsoidCore(radius, radius, radius, subdivisions, center)
}

function ellipsoidCore(a: number, b: number, c: number, subdivisions: number, center: Vec3): TriMesh {
  checkInt('subdivisions', subdivisions, 0, 9)
  checkPositive('a', a); checkPositive('b', b); checkPositive('c', c)
  const u = unitIcosphere(subdivisions)
  const p = new Float64Array(u.positions.length)
  const up = u.positions
  const [cx, cy, cz] = center
  for (let i = 0; i < p.length; i += 3) {
    p[i] = a * up[i]! + cx
    p[i + 1] = b * up[i + 1]! + cy
    p[i + 2] = c * up[i + 2]! + cz
  }
  return { positions: p, indices: u.indices.slice() }
}

/**
 * Triaxial ellipsoid with semi-axes a, b, c (m) along x, y, z, centred at the origin: the unit
 * icosphere scaled per axis (vertices lie on the ellipsoid; faces are not equal-area).
 */
export function ellipsoidMesh(a: number, b: number, c: number, subdivisions: number): TriMesh {
  return ellipsoidCore(a, b, c, subdivisions, [0, 0, 0])
}

/** Axis-aligned box with edge lengths lx, ly, lz (m) centred at `center`: 8 vertices, 12 triangles. */
export function boxMesh(lx: number, ly: number, lz: number, center: Vec3 = [0, 0, 0]): TriMesh {
  checkPositive('lx', lx); checkPositive('ly', ly); checkPositive('lz', lz)
  const hx = lx / 2, hy = ly / 2, hz = lz / 2
  const [cx, cy, cz] = center
  const positions = new Float64Array(24)
  for (let i = 0; i < 8; i++) {
    positions[3 * i] = cx + (i & 1 ? hx : -hx)
    positions[3 * i + 1] = cy + (i & 2 ? hy : -hy)
    positions[3 * i + 2] = cz + (i & 4 ? hz : -hz)
  }
  // vertex i has bits (x, y, z); quads listed CCW seen from outside
  const quads = [
    [0, 2, 3, 1], // z-
    [4, 5, 7, 6], // z+
    [0, 1, 5, 4], // y-
    [2, 6, 7, 3], // y+
    [0, 4, 6, 2], // x-
    [1, 3, 7, 5], // x+
  ]
  const indices = new Uint32Array(36)
  let k = 0
  for (const [a, b, c, d] of quads) {
    indices[k++] = a!; indices[k++] = b!; indices[k++] = c!
    indices[k++] = a!; indices[k++] = c!; indices[k++] = d!
  }
  return { positions, indices }
}

/**
 * Smooth, seeded, star-shaped lobe for demos: the ellipsoid (a, b, c) with each vertex moved along
 * its ray from the origin by the factor 1 + amplitude·f(u), where f is a sum of 12 random low
 * frequency plane waves on the unit direction u, rescaled to [−1, 1]. Requires 0 ≤ amplitude < 1
 * (so every radius stays positive and the surface stays star-shaped about the origin).
 * Same (arguments, seed) → same mesh.
 */
export function perturbedEllipsoid(a: number, b: number, c: number, subdivisions: number, seed: number, amplitude: number): TriMesh {
  if (!(amplitude >= 0 && amplitude < 1)) throw new GeometryError('bad-argument', `amplitude must be in [0, 1), got ${amplitude}`)
  const mesh = ellipsoidMesh(a, b, c, subdivisions)
  const u = unitIcosphere(subdivisions).positions
  const rnd = seededRandom(seed)
  const waves: number[][] = []
  const K = 12
  for (let k = 0; k < K; k++) {
    // random unit direction, frequency 0.5..2.5 rad per unit, random phase, weight ~ 1/freq
    const z = 2 * rnd() - 1, t = 2 * Math.PI * rnd(), s = Math.sqrt(1 - z * z)
    const freq = 0.5 + 2 * rnd()
    waves.push([s * Math.cos(t) * freq, s * Math.sin(t) * freq, z * freq, 2 * Math.PI * rnd(), 1 / freq])
  }
  const nv = u.length / 3
  const f = new Float64Array(nv)
  let fmin = Infinity, fmax = -Infinity
  for (let i = 0; i < nv; i++) {
    const x = u[3 * i]!, y = u[3 * i + 1]!, z = u[3 * i + 2]!
    let v = 0
    for (const w of waves) v += w[4]! * Math.cos(w[0]! * x + w[1]! * y + w[2]! * z + w[3]!)
    f[i] = v
    if (v < fmin) fmin = v
    if (v > fmax) fmax = v
  }
  const span = fmax - fmin || 1
  const p = mesh.positions
  for (let i = 0; i < nv; i++) {
    const s = 1 + amplitude * (2 * (f[i]! - fmin) / span - 1)
    p[3 * i] = p[3 * i]! * s; p[3 * i + 1] = p[3 * i + 1]! * s; p[3 * i + 2] = p[3 * i + 2]! * s
  }
  return mesh
}

/**
 * New mesh with p' = R·p + t for every vertex (R a 3×3 matrix, rows first, or a unit quaternion
 * [w, x, y, z]; t in metres). If det R < 0 (a reflection) the winding of every face is reversed
 * so normals stay outward. The input is not modified.
 */
export function transformMesh(mesh: TriMesh, rotation: Mat3 | Quat, translation: Vec3 = [0, 0, 0]): TriMesh {
  const R: Mat3 = rotation.length === 4 ? quatToMat3(rotation as Quat) : (rotation as Mat3)
  const [r0, r1, r2] = R
  const src = mesh.positions
  const p = new Float64Array(src.length)
  const [tx, ty, tz] = translation
  for (let i = 0; i < p.length; i += 3) {
    const x = src[i]!, y = src[i + 1]!, z = src[i + 2]!
    p[i] = r0[0] * x + r0[1] * y + r0[2] * z + tx
    p[i + 1] = r1[0] * x + r1[1] * y + r1[2] * z + ty
    p[i + 2] = r2[0] * x + r2[1] * y + r2[2] * z + tz
  }
  const det = r0[0] * (r1[1] * r2[2] - r1[2] * r2[1]) - r0[1] * (r1[0] * r2[2] - r1[2] * r2[0]) + r0[2] * (r1[0] * r2[1] - r1[1] * r2[0])
  const indices = mesh.indices.slice()
  if (det < 0) {
    for (let f = 0; f < indices.length; f += 3) {
      const t = indices[f + 1]!
      indices[f + 1] = indices[f + 2]!
      indices[f + 2] = t
    }
  }
  return { positions: p, indices }
}

/** Concatenate meshes into one (vertex indices offset; no welding, no boolean union). */
export function mergeMeshes(meshes: readonly TriMesh[]): TriMesh {
  let nv = 0, ni = 0
  for (const m of meshes) { nv += m.positions.length; ni += m.indices.length }
  const positions = new Float64Array(nv)
  const indices = new Uint32Array(ni)
  let vo = 0, io = 0
  for (const m of meshes) {
    positions.set(m.positions, vo)
    const off = vo / 3
    const src = m.indices
    for (let i = 0; i < src.length; i++) indices[io + i] = src[i]! + off
    vo += m.positions.length
    io += src.length
  }
  return { positions, indices }
}
