/**
 * Exact monomial moments ∫_V x^i y^j z^k dV (i + j + k ≤ 4) and the surface area of a closed,
 * outward-wound triangle mesh, in one pass over the faces and one over the vertices.
 *
 * Each face is the base of a signed tetrahedron T = (o, a, b, c) (coordinates relative to the
 * origin o, 6V = a·(b × c)); the polyhedron's moment is the sum over its faces (divergence
 * theorem; Mirtich 1996). Per tetrahedron, for a homogeneous form of degree n,
 *   ∫_T (u·x)ⁿ dV = 6V · n!/(n+3)! · h_n(u·a, u·b, u·c),
 * h_n the complete homogeneous symmetric polynomial: the Dirichlet integral of barycentric
 * monomials, ∫_T λ₁^p λ₂^q λ₃^r dV = 6V p! q! r!/(p+q+r+3)! (Grundmann & Möller 1978). Newton's
 * identities give h_n from the power sums p_k = (u·a)^k + (u·b)^k + (u·c)^k; with s = a + b + c,
 * L = u·s and K = uᵀ(aaᵀ + bbᵀ + ccᵀ + ssᵀ)u:
 *   n = 1:  h₁ = L,     n = 2:  2h₂ = K,
 *   n = 3:  6h₃ = p₁³ + 3p₁p₂ + 2p₃ = 3LK − 2L³ + 2p₃,
 *   n = 4:  24h₄ = p₁⁴ + 6p₁²p₂ + 3p₂² + 8p₁p₃ + 6p₄ = 3K² − 2L⁴ + Σ_{v∈{a,b,c}} (u·v)³ u·(8s + 6v).
 * The terms in p₃ and (u·v)³ are sums over a face's vertices: they are gathered per vertex (Σ over
 * the vertex's faces of 6V and 6V·s) and evaluated once per vertex. n ≤ 2 are the usual
 * tetrahedron formulas (Tonon 2005). Matching the coefficients of u turns the forms into
 * symmetric tensors, e.g. K² ↦ (K_ij K_kl + K_ik K_jl + K_il K_jk)/3.
 */
import type { TriMesh, Vec3 } from '../types'

/** Monomial exponents (i, j, k) in the order of `PolyhedronMoments.moments`: degree 0, 1, 2, 3, 4, each i descending, then j. */
export const MOMENT_MONOMIALS: [number, number, number][] = []
for (let n = 0; n <= 4; n++) for (let i = n; i >= 0; i--) for (let j = n - i; j >= 0; j--) MOMENT_MONOMIALS.push([i, j, n - i - j])

export interface PolyhedronMoments {
  /** ∫_V x^i y^j z^k dV about the origin, m^(3+i+j+k), in MOMENT_MONOMIALS order (35 values; [0] is the volume). */
  moments: Float64Array
  /** Surface area, m². */
  surfaceArea: number
}

/**
 * Moments to degree 4 about `origin` (m, file frame; choose a point near the mesh, e.g. the
 * bounding-box centre, to limit cancellation). The mesh must be closed and outward-wound.
 */
export function polyhedronMoments(mesh: TriMesh, origin: Vec3): PolyhedronMoments {
  const P = mesh.positions, I = mesh.indices
  const n = I.length, nv = P.length / 3
  const [ox, oy, oz] = origin
  const sums = new Float64Array(SUMS)
  // per vertex: Σ 6V and Σ 6V·s over the faces at the vertex
  const gathered = new Float64Array(4 * nv)
  // Blocks: the block functions become hot after a few calls and are compiled with their sums as
  // unboxed float64 locals. One long loop would first run as on-stack-replaced code, whose sums
  // stay boxed (several times slower on the first call, which is the one that counts).
  for (let f = 0; f < n; f += BLOCK) faceBlock(P, I, ox, oy, oz, f, Math.min(n, f + BLOCK), sums, gathered)
  for (let v = 0; v < nv; v += BLOCK) vertexBlock(P, ox, oy, oz, v, Math.min(nv, v + BLOCK), gathered, sums)
  const moments = new Float64Array(35)
  moments[0] = sums[0]! / 6 // ∫ 1 = Σ 6V/6
  for (let k = 1; k < 4; k++) moments[k] = sums[1 + k]! / 24 // ∫ u·x = Σ 6V·L/24
  for (let k = 4; k < 10; k++) moments[k] = sums[1 + k]! / 120 // ∫ (u·x)² = Σ 6V·2h₂/120
  for (let k = 10; k < 20; k++) moments[k] = sums[1 + k]! / 720 // ∫ (u·x)³ = Σ 6V·6h₃/720
  for (let k = 20; k < 35; k++) moments[k] = sums[1 + k]! / 5040 // ∫ (u·x)⁴ = Σ 6V·24h₄/5040
  return { moments, surfaceArea: sums[1]! / 2 }
}

/** Sums kept: 6V, 2·area, then the 34 moment sums of degree 1..4. */
const SUMS = 36
/** Faces (× 3 indices) or vertices per call of the block functions. */
const BLOCK = 3 * 2048

/**
 * Faces with indices [from, to): adds to sums 6V = d, 2·area, and d times the symmetric-tensor
 * components of s (degree 1), K (2), 3 s⊗K − 2 s⊗s⊗s (3) and 3 K⊗K − 2 s⊗s⊗s⊗s (4), each
 * symmetrised (e.g. xxy: 2 s_x K_xy + s_y K_xx; xxyy: K_xx K_yy + 2 K_xy²); to `gathered`
 * (4 per vertex) d and d·s at each corner.
 */
function faceBlock(P: Float64Array, I: Uint32Array, ox: number, oy: number, oz: number, from: number, to: number, sums: Float64Array, gathered: Float64Array): void {
  let V6 = 0, area2 = 0, m1 = 0, m2 = 0, m3 = 0, m4 = 0, m5 = 0, m6 = 0, m7 = 0, m8 = 0, m9 = 0
  let m10 = 0, m11 = 0, m12 = 0, m13 = 0, m14 = 0, m15 = 0, m16 = 0, m17 = 0, m18 = 0, m19 = 0
  let m20 = 0, m21 = 0, m22 = 0, m23 = 0, m24 = 0, m25 = 0, m26 = 0, m27 = 0, m28 = 0, m29 = 0, m30 = 0, m31 = 0, m32 = 0, m33 = 0, m34 = 0
  for (let f = from; f < to; f += 3) {
    const ia = I[f]!, ib = I[f + 1]!, ic = I[f + 2]!
    const a = 3 * ia, b = 3 * ib, c = 3 * ic
    const ax = P[a]! - ox, ay = P[a + 1]! - oy, az = P[a + 2]! - oz
    const bx = P[b]! - ox, by = P[b + 1]! - oy, bz = P[b + 2]! - oz
    const cx = P[c]! - ox, cy = P[c + 1]! - oy, cz = P[c + 2]! - oz
    const d = ax * (by * cz - bz * cy) + ay * (bz * cx - bx * cz) + az * (bx * cy - by * cx) // 6V
    V6 += d
    const ux = bx - ax, uy = by - ay, uz = bz - az, wx = cx - ax, wy = cy - ay, wz = cz - az
    const nx = uy * wz - uz * wy, ny = uz * wx - ux * wz, nz = ux * wy - uy * wx
    area2 += Math.sqrt(nx * nx + ny * ny + nz * nz)
    const sx = ax + bx + cx, sy = ay + by + cy, sz = az + bz + cz
    const dsx = d * sx, dsy = d * sy, dsz = d * sz
    m1 += dsx; m2 += dsy; m3 += dsz
    const ga = 4 * ia, gb = 4 * ib, gc = 4 * ic
    gathered[ga] += d; gathered[ga + 1] += dsx; gathered[ga + 2] += dsy; gathered[ga + 3] += dsz
    gathered[gb] += d; gathered[gb + 1] += dsx; gathered[gb + 2] += dsy; gathered[gb + 3] += dsz
    gathered[gc] += d; gathered[gc + 1] += dsx; gathered[gc + 2] += dsy; gathered[gc + 3] += dsz
    const sxx = sx * sx, sxy = sx * sy, sxz = sx * sz, syy = sy * sy, syz = sy * sz, szz = sz * sz
    const kxx = ax * ax + bx * bx + cx * cx + sxx, kyy = ay * ay + by * by + cy * cy + syy, kzz = az * az + bz * bz + cz * cz + szz
    const kxy = ax * ay + bx * by + cx * cy + sxy, kxz = ax * az + bx * bz + cx * cz + sxz, kyz = ay * az + by * bz + cy * cz + syz
    // degree 2: K
    m4 += d * kxx; m5 += d * kxy; m6 += d * kxz; m7 += d * kyy; m8 += d * kyz; m9 += d * kzz
    // degree 3: 3·sym(s⊗K) − 2 s⊗s⊗s
    const d2 = 2 * d, d3 = 3 * d
    m10 += dsx * (3 * kxx - 2 * sxx)
    m11 += d * (2 * sx * kxy + sy * kxx) - 2 * dsy * sxx
    m12 += d * (2 * sx * kxz + sz * kxx) - 2 * dsz * sxx
    m13 += d * (2 * sy * kxy + sx * kyy) - 2 * dsx * syy
    m14 += d * (sx * kyz + sy * kxz + sz * kxy) - 2 * dsx * syz
    m15 += d * (2 * sz * kxz + sx * kzz) - 2 * dsx * szz
    m16 += dsy * (3 * kyy - 2 * syy)
    m17 += d * (2 * sy * kyz + sz * kyy) - 2 * dsz * syy
    m18 += d * (2 * sz * kyz + sy * kzz) - 2 * dsy * szz
    m19 += dsz * (3 * kzz - 2 * szz)
    // degree 4: 3·sym(K⊗K) − 2 s⊗s⊗s⊗s
    m20 += d * (3 * kxx * kxx - 2 * sxx * sxx)
    m21 += d3 * kxx * kxy - d2 * sxx * sxy
    m22 += d3 * kxx * kxz - d2 * sxx * sxz
    m23 += d * (kxx * kyy + 2 * kxy * kxy) - d2 * sxx * syy
    m24 += d * (kxx * kyz + 2 * kxy * kxz) - d2 * sxx * syz
    m25 += d * (kxx * kzz + 2 * kxz * kxz) - d2 * sxx * szz
    m26 += d3 * kyy * kxy - d2 * syy * sxy
    m27 += d * (kyy * kxz + 2 * kxy * kyz) - d2 * syy * sxz
    m28 += d * (kzz * kxy + 2 * kxz * kyz) - d2 * szz * sxy
    m29 += d3 * kzz * kxz - d2 * szz * sxz
    m30 += d * (3 * kyy * kyy - 2 * syy * syy)
    m31 += d3 * kyy * kyz - d2 * syy * syz
    m32 += d * (kyy * kzz + 2 * kyz * kyz) - d2 * syy * szz
    m33 += d3 * kzz * kyz - d2 * szz * syz
    m34 += d * (3 * kzz * kzz - 2 * szz * szz)
  }
  const add = [V6, area2, m1, m2, m3, m4, m5, m6, m7, m8, m9, m10, m11, m12, m13, m14, m15, m16, m17, m18, m19, m20, m21, m22, m23, m24, m25, m26, m27, m28, m29, m30, m31, m32, m33, m34]
  for (let k = 0; k < SUMS; k++) sums[k] = sums[k]! + add[k]!
}

/**
 * Vertices [from, to): with W = Σ d and T = Σ d·s over the vertex's faces (`gathered`), adds the
 * vertex terms 2W·v⊗v⊗v (degree 3) and sym(v⊗v⊗v⊗R), R = 8T + 6W·v (degree 4), v relative to o.
 */
function vertexBlock(P: Float64Array, ox: number, oy: number, oz: number, from: number, to: number, gathered: Float64Array, sums: Float64Array): void {
  let m10 = 0, m11 = 0, m12 = 0, m13 = 0, m14 = 0, m15 = 0, m16 = 0, m17 = 0, m18 = 0, m19 = 0
  let m20 = 0, m21 = 0, m22 = 0, m23 = 0, m24 = 0, m25 = 0, m26 = 0, m27 = 0, m28 = 0, m29 = 0, m30 = 0, m31 = 0, m32 = 0, m33 = 0, m34 = 0
  for (let v = from; v < to; v++) {
    const W = gathered[4 * v]!
    const x = P[3 * v]! - ox, y = P[3 * v + 1]! - oy, z = P[3 * v + 2]! - oz
    // sym(v³⊗R)_α = ¼ Σ_m α_m R_m v^(α − e_m); r = R/4
    const rx = 2 * gathered[4 * v + 1]! + 1.5 * W * x, ry = 2 * gathered[4 * v + 2]! + 1.5 * W * y, rz = 2 * gathered[4 * v + 3]! + 1.5 * W * z
    const xx = x * x, xy = x * y, xz = x * z, yy = y * y, yz = y * z, zz = z * z
    const xxx = xx * x, xxy = xx * y, xxz = xx * z, xyy = xy * y, xyz = xy * z, xzz = xz * z, yyy = yy * y, yyz = yy * z, yzz = yz * z, zzz = zz * z
    const w = 2 * W
    m10 += w * xxx; m11 += w * xxy; m12 += w * xxz; m13 += w * xyy; m14 += w * xyz
    m15 += w * xzz; m16 += w * yyy; m17 += w * yyz; m18 += w * yzz; m19 += w * zzz
    m20 += 4 * rx * xxx
    m21 += 3 * rx * xxy + ry * xxx
    m22 += 3 * rx * xxz + rz * xxx
    m23 += 2 * (rx * xyy + ry * xxy)
    m24 += 2 * rx * xyz + ry * xxz + rz * xxy
    m25 += 2 * (rx * xzz + rz * xxz)
    m26 += rx * yyy + 3 * ry * xyy
    m27 += rx * yyz + 2 * ry * xyz + rz * xyy
    m28 += rx * yzz + ry * xzz + 2 * rz * xyz
    m29 += rx * zzz + 3 * rz * xzz
    m30 += 4 * ry * yyy
    m31 += 3 * ry * yyz + rz * yyy
    m32 += 2 * (ry * yzz + rz * yyz)
    m33 += ry * zzz + 3 * rz * yzz
    m34 += 4 * rz * zzz
  }
  const add = [m10, m11, m12, m13, m14, m15, m16, m17, m18, m19, m20, m21, m22, m23, m24, m25, m26, m27, m28, m29, m30, m31, m32, m33, m34]
  for (let k = 0; k < 25; k++) sums[11 + k] = sums[11 + k]! + add[k]!
}
