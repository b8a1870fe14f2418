/**
 * Exterior (and surface) gravity of a constant-density closed polyhedron, Werner & Scheeres 1997
 * (Celest. Mech. Dyn. Astron. 65, 313–344), docs/polyhedral-gravity.md:
 *   U = (Gρ/2)[Σ_e L_e r_eᵀE_e r_e − Σ_f ω_f r_fᵀF_f r_f] > 0,   g = ∇U = −Gρ[Σ_e L_e E_e r_e − Σ_f ω_f F_f r_f],
 * r_e, r_f = vectors from the field point to a vertex of the edge / face. Units: m, kg m⁻³, m² s⁻², m s⁻².
 *
 * Frames: points passed to `potential`, `acceleration` and `surfaceFieldChunk` are in the FILE frame
 * (the mesh's coordinates). Internally the vertices are stored relative to the model's volume
 * centroid (`model.origin`, file frame) for precision; the spin in `surfaceFieldChunk` is about an
 * axis through that centroid, ω in file-frame components (rad s⁻¹).
 */
import type { TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import { G } from '../mass/mass'
import { analyseEdges } from '../mesh/edges'

export interface PolyhedronModel {
  /** Volume centroid, file frame, m. */
  origin: Vec3
  /** Vertices relative to origin, m. */
  vertices: Float64Array
  faces: Uint32Array
  /** Unit outward face normals (3 per face). */
  faceNormals: Float64Array
  /** Edge endpoints (2 per edge; coplanar edges skipped). */
  edges: Uint32Array
  /** Edge lengths, m. */
  edgeLengths: Float64Array
  /** E_e dyads (symmetric), 6 per edge: xx, xy, xz, yy, yz, zz. */
  edgeDyads: Float64Array
  /** Edges skipped because their two faces are coplanar (E_e = 0). */
  coplanarEdges: number
  /** Scratch: distance from the current field point to each vertex. */
  scratch: Float64Array
}

/**
 * Precompute face normals and edge dyads of a closed, outward-oriented mesh (run `validateMesh` first).
 * @throws GeometryError 'open-mesh' when an edge lacks its twin.
 */
export function preparePolyhedron(mesh: TriMesh): PolyhedronModel {
  const P = mesh.positions, I = mesh.indices
  const nv = P.length / 3, nf = I.length / 3
  // volume centroid
  let v6 = 0, sx = 0, sy = 0, sz = 0
  const o0 = [P[0]!, P[1]!, P[2]!]
  for (let f = 0; f < I.length; f += 3) {
    const a = 3 * I[f]!, b = 3 * I[f + 1]!, c = 3 * I[f + 2]!
    const ax = P[a]! - o0[0]!, ay = P[a + 1]! - o0[1]!, az = P[a + 2]! - o0[2]!
    const bx = P[b]! - o0[0]!, by = P[b + 1]! - o0[1]!, bz = P[b + 2]! - o0[2]!
    const cx = P[c]! - o0[0]!, cy = P[c + 1]! - o0[1]!, cz = P[c + 2]! - o0[2]!
    const d = ax * (by * cz - bz * cy) + ay * (bz * cx - bx * cz) + az * (bx * cy - by * cx)
    v6 += d; sx += d * (ax + bx + cx); sy += d * (ay + by + cy); sz += d * (az + bz + cz)
  }
  const origin: Vec3 = [o0[0]! + sx / (4 * v6), o0[1]! + sy / (4 * v6), o0[2]! + sz / (4 * v6)]
  const V = new Float64Array(P.length)
  for (let v = 0; v < nv; v++) { V[3 * v] = P[3 * v]! - origin[0]; V[3 * v + 1] = P[3 * v + 1]! - origin[1]; V[3 * v + 2] = P[3 * v + 2]! - origin[2] }
  const N = new Float64Array(3 * nf)
  for (let f = 0; f < nf; f++) {
    const a = 3 * I[3 * f]!, b = 3 * I[3 * f + 1]!, c = 3 * I[3 * f + 2]!
    const ux = V[b]! - V[a]!, uy = V[b + 1]! - V[a + 1]!, uz = V[b + 2]! - V[a + 2]!
    const wx = V[c]! - V[a]!, wy = V[c + 1]! - V[a + 1]!, wz = V[c + 2]! - V[a + 2]!
    const nx = uy * wz - uz * wy, ny = uz * wx - ux * wz, nz = ux * wy - uy * wx
    const n = Math.hypot(nx, ny, nz)
    N[3 * f] = nx / n; N[3 * f + 1] = ny / n; N[3 * f + 2] = nz / n
  }
  const E = analyseEdges(I, nv)
  if (E.boundary > 0 || E.nonManifold > 0) throw new GeometryError('open-mesh', `preparePolyhedron: ${E.boundary} boundary and ${E.nonManifold} non-manifold edges; run validateMesh first`)
  const ne = (3 * nf) / 2
  const edges = new Uint32Array(2 * ne)
  const lens = new Float64Array(ne)
  const dy = new Float64Array(6 * ne)
  let k = 0, coplanar = 0
  for (let h = 0; h < 3 * nf; h++) {
    const t = E.twin[h]!
    if (t < h) continue
    const fa = (h / 3) | 0, fb = (t / 3) | 0
    const i = I[h]!, j = I[h % 3 === 2 ? h - 2 : h + 1]!
    const ex = V[3 * j]! - V[3 * i]!, ey = V[3 * j + 1]! - V[3 * i + 1]!, ez = V[3 * j + 2]! - V[3 * i + 2]!
    const len = Math.hypot(ex, ey, ez)
    const nax = N[3 * fa]!, nay = N[3 * fa + 1]!, naz = N[3 * fa + 2]!
    const nbx = N[3 * fb]!, nby = N[3 * fb + 1]!, nbz = N[3 * fb + 2]!
    // coplanar neighbours: E_e = 0 exactly in theory; skip (else 0·∞ on that edge)
    const cxn = nay * nbz - naz * nby, cyn = naz * nbx - nax * nbz, czn = nax * nby - nay * nbx
    if (Math.hypot(cxn, cyn, czn) < 1e-12 && nax * nbx + nay * nby + naz * nbz > 0) { coplanar++; continue }
    // edge normals: in face A the edge runs i→j (CCW), outward normal (e × n_A)/|e|; in face B it runs j→i
    const pax = (ey * naz - ez * nay) / len, pay = (ez * nax - ex * naz) / len, paz = (ex * nay - ey * nax) / len
    const pbx = -(ey * nbz - ez * nby) / len, pby = -(ez * nbx - ex * nbz) / len, pbz = -(ex * nby - ey * nbx) / len
    // E_e = n_A p_Aᵀ + n_B p_Bᵀ is symmetric (Werner & Scheeres 1997): keep xx xy xz yy yz zz, the
    // off-diagonal terms as the mean of the two computed ones (they differ by rounding only);
    // 6 numbers instead of 9 per edge make the kernel's edge pass read a third less memory
    const o = 6 * k
    dy[o] = nax * pax + nbx * pbx
    dy[o + 1] = ((nax * pay + nbx * pby) + (nay * pax + nby * pbx)) / 2
    dy[o + 2] = ((nax * paz + nbx * pbz) + (naz * pax + nbz * pbx)) / 2
    dy[o + 3] = nay * pay + nby * pby
    dy[o + 4] = ((nay * paz + nby * pbz) + (naz * pay + nbz * pby)) / 2
    dy[o + 5] = naz * paz + nbz * pbz
    edges[2 * k] = i; edges[2 * k + 1] = j
    lens[k] = len
    k++
  }
  return {
    origin, vertices: V, faces: I.slice(), faceNormals: N,
    edges: edges.slice(0, 2 * k), edgeLengths: lens.slice(0, k), edgeDyads: dy.slice(0, 6 * k),
    coplanarEdges: coplanar, scratch: new Float64Array(nv),
  }
}

/** Field evaluation at a point relative to the origin; returns U/(Gρ) and writes g/(Gρ) to out, Σω to omega[0]. */
export function evalAt(m: PolyhedronModel, px: number, py: number, pz: number, out: Float64Array | number[] | null, omega: number[] | null): number {
  const V = m.vertices, F = m.faces, N = m.faceNormals, Ed = m.edges, Ls = m.edgeLengths, D = m.edgeDyads, R = m.scratch
  const nv = V.length / 3
  for (let v = 0; v < nv; v++) {
    const x = V[3 * v]! - px, y = V[3 * v + 1]! - py, z = V[3 * v + 2]! - pz
    R[v] = Math.sqrt(x * x + y * y + z * z)
  }
  let U = 0, gx = 0, gy = 0, gz = 0, wsum = 0
  const ne = Ls.length
  for (let e = 0; e < ne; e++) {
    const i = Ed[2 * e]!, j = Ed[2 * e + 1]!
    const s = R[i]! + R[j]!, len = Ls[e]!
    const Le = Math.log((s + len) / (s - len))
    const rx = V[3 * i]! - px, ry = V[3 * i + 1]! - py, rz = V[3 * i + 2]! - pz
    const o = 6 * e
    const dxy = D[o + 1]!, dxz = D[o + 2]!, dyz = D[o + 4]!
    const ex = D[o]! * rx + dxy * ry + dxz * rz
    const ey = dxy * rx + D[o + 3]! * ry + dyz * rz
    const ez = dxz * rx + dyz * ry + D[o + 5]! * rz
    U += Le * (rx * ex + ry * ey + rz * ez)
    gx += Le * ex; gy += Le * ey; gz += Le * ez
  }
  const nf = N.length / 3
  for (let f = 0; f < nf; f++) {
    const a = F[3 * f]!, b = F[3 * f + 1]!, c = F[3 * f + 2]!
    const ax = V[3 * a]! - px, ay = V[3 * a + 1]! - py, az = V[3 * a + 2]! - pz
    const bx = V[3 * b]! - px, by = V[3 * b + 1]! - py, bz = V[3 * b + 2]! - pz
    const cx = V[3 * c]! - px, cy = V[3 * c + 1]! - py, cz = V[3 * c + 2]! - pz
    const ra = R[a]!, rb = R[b]!, rc = R[c]!
    const num = ax * (by * cz - bz * cy) + ay * (bz * cx - bx * cz) + az * (bx * cy - by * cx)
    const den = ra * rb * rc + ra * (bx * cx + by * cy + bz * cz) + rb * (cx * ax + cy * ay + cz * az) + rc * (ax * bx + ay * by + az * bz)
    const w = 2 * Math.atan2(num, den)
    wsum += w
    const nx = N[3 * f]!, ny = N[3 * f + 1]!, nz = N[3 * f + 2]!
    const d = nx * ax + ny * ay + nz * az // n̂·r_f; F_f r_f = n̂ (n̂·r_f)
    U -= w * d * d
    gx -= w * nx * d; gy -= w * ny * d; gz -= w * nz * d
  }
  if (out) { out[0] = -gx; out[1] = -gy; out[2] = -gz }
  if (omega) omega[0] = wsum
  return U / 2
}

/** Gravitational potential U > 0 (m² s⁻²) at a file-frame point (m), density ρ (kg m⁻³). */
export function potential(model: PolyhedronModel, density: number, point: Vec3): number {
  return G * density * evalAt(model, point[0] - model.origin[0], point[1] - model.origin[1], point[2] - model.origin[2], null, null)
}

/**
 * Potential U (m² s⁻², returned) and acceleration g = ∇U (m s⁻², written to `out`) at a file-frame
 * point in one pass of the kernel (half the cost of `potential` + `acceleration`).
 */
export function potentialAndAcceleration(model: PolyhedronModel, density: number, point: Vec3, out: Vec3): number {
  const g = out as unknown as number[]
  const k = G * density
  const U = k * evalAt(model, point[0] - model.origin[0], point[1] - model.origin[1], point[2] - model.origin[2], g, null)
  out[0] = g[0]! * k; out[1] = g[1]! * k; out[2] = g[2]! * k
  return U
}

/** Gravitational acceleration g = ∇U (m s⁻²) at a file-frame point, written to `out` (returned). */
export function acceleration(model: PolyhedronModel, density: number, point: Vec3, out: Vec3 = [0, 0, 0]): Vec3 {
  const g = [0, 0, 0]
  evalAt(model, point[0] - model.origin[0], point[1] - model.origin[1], point[2] - model.origin[2], g, null)
  const k = G * density
  out[0] = g[0]! * k; out[1] = g[1]! * k; out[2] = g[2]! * k
  return out
}

/** Σ_f ω_f at a file-frame point: 4π inside, 0 outside, 2π on a face (Laplacian ∇²U = −Gρ Σω). */
export function solidAngleSum(model: PolyhedronModel, point: Vec3): number {
  const w = [0]
  evalAt(model, point[0] - model.origin[0], point[1] - model.origin[1], point[2] - model.origin[2], null, w)
  return w[0]!
}

export interface SurfaceFieldOut {
  /** |g| of the gravitational acceleration alone, m s⁻². */
  gravity: Float64Array
  /** Angle (degrees) between the reversed outward normal −n̂ and the total acceleration g + ω²r_⊥ (0 = flat). */
  slopeDeg: Float64Array
  /** Effective potential U + ½|ω × r|² (m² s⁻², r from the centroid), > 0 convention. */
  potential: Float64Array
  /** Optional: |total acceleration| (gravity + centrifugal), m s⁻². */
  totalAcceleration?: Float64Array
  /** Optional: U alone (m² s⁻²). */
  gravitationalPotential?: Float64Array
}

/**
 * Surface field for points [start, end) — the kernel that worker threads run on chunks.
 * points, normals: 3 per point, file frame (normals unit, outward). spin: ω (rad s⁻¹, file-frame
 * components) about an axis through the model's centroid, or null (no rotation). Centrifugal
 * acceleration −ω×(ω×r), r = point − centroid. Writes out[...][i] for i in [start, end).
 */
export function surfaceFieldChunk(model: PolyhedronModel, density: number, points: Float64Array, normals: Float64Array,
  spin: { omega: Vec3 } | null, start: number, end: number, out: SurfaceFieldOut): void {
  const k = G * density
  const g = [0, 0, 0]
  const [wx, wy, wz] = spin ? spin.omega : [0, 0, 0]
  const [ox, oy, oz] = model.origin
  for (let i = start; i < end; i++) {
    const rx = points[3 * i]! - ox, ry = points[3 * i + 1]! - oy, rz = points[3 * i + 2]! - oz
    const U = k * evalAt(model, rx, ry, rz, g, null)
    const gx = k * g[0]!, gy = k * g[1]!, gz = k * g[2]!
    // ω × r and −ω × (ω × r)
    const vx = wy * rz - wz * ry, vy = wz * rx - wx * rz, vz = wx * ry - wy * rx
    const cx = -(wy * vz - wz * vy), cy = -(wz * vx - wx * vz), cz = -(wx * vy - wy * vx)
    const ax = gx + cx, ay = gy + cy, az = gz + cz
    const amag = Math.hypot(ax, ay, az)
    const nx = normals[3 * i]!, ny = normals[3 * i + 1]!, nz = normals[3 * i + 2]!
    const cosang = amag > 0 ? -(nx * ax + ny * ay + nz * az) / amag : 1
    out.gravity[i] = Math.hypot(gx, gy, gz)
    out.slopeDeg[i] = (Math.acos(Math.min(1, Math.max(-1, cosang))) * 180) / Math.PI
    out.potential[i] = U + 0.5 * (vx * vx + vy * vy + vz * vz)
    if (out.totalAcceleration) out.totalAcceleration[i] = amag
    if (out.gravitationalPotential) out.gravitationalPotential[i] = U
  }
}

/** { min, max, mean } of values; mean weighted by `weights` (e.g. facet areas) when given. NaN for none. */
export function summarise(values: ArrayLike<number>, weights?: ArrayLike<number>): { min: number, max: number, mean: number } {
  let min = Infinity, max = -Infinity, s = 0, w = 0
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!
    if (v < min) min = v
    if (v > max) max = v
    const wi = weights ? weights[i]! : 1
    s += v * wi; w += wi
  }
  if (values.length === 0) return { min: Number.NaN, max: Number.NaN, mean: Number.NaN }
  return { min, max, mean: s / w }
}
