/**
 * Exterior spherical-harmonic coefficients (degree ≤ 4) of a constant-density closed polyhedron.
 *
 * Convention (docs/conventions.md): U = (GM/r)[1 + Σ_l Σ_m (R/r)^l P_lm(sin φ)(C_lm cos mλ + S_lm sin mλ)],
 * P_lm without the Condon–Shortley phase, so
 *   C_lm, S_lm = (2 − δ_m0) (l−m)!/(l+m)! · (1/(M R^l)) ∫ ρ r^l P_lm(sin φ) {cos mλ, sin mλ} dV.
 * The solid harmonics r^l P_lm(sin φ){cos, sin}(mλ) are homogeneous polynomials of degree l in
 * (x, y, z) (built by the standard recurrences, no trigonometry), so their volume integrals are
 * combinations of the polyhedron's exact monomial moments (moments.ts), composed here as
 * polynomials (`harmonicIntegralsFromMoments`; Werner 1997 obtains the same coefficients by a
 * different recursion). A second, independent route, used to check the first in tests
 * (`solidHarmonicIntegrals`): by Euler's theorem ∇·(x f) = (l+3) f for f homogeneous of degree l,
 *   ∫_V f dV = Σ_faces 3 V_t/(l+3) · (1/A_t) ∫_t f dA,
 * with V_t the signed volume of the tetrahedron (origin, face) and the triangle mean evaluated with
 * Dunavant's 6-point rule, exact for polynomials of degree 4.
 * 4π (Kaula) normalisation: C̄_lm = C_lm / N_lm, N_lm = √[(2−δ_m0)(2l+1)(l−m)!/(l+m)!].
 */
import type { Mat3, TriMesh, Vec3 } from '../types'
import { factorial, kaulaNormalization } from '../math/special'
import { MOMENT_MONOMIALS } from './moments'

export const HARMONIC_DEGREE = 4
/** Number of real solid harmonics up to degree 4 stored as (l, m, cos|sin). */
const L = HARMONIC_DEGREE

// Dunavant (1985) degree-4 rule on a triangle, barycentric points and weights (weights sum to 1).
const A1 = 0.445948490915965, W1 = 0.223381589678011
const A2 = 0.091576213509771, W2 = 0.109951743655322
const QB: number[][] = [
  [1 - 2 * A1, A1, A1], [A1, 1 - 2 * A1, A1], [A1, A1, 1 - 2 * A1],
  [1 - 2 * A2, A2, A2], [A2, 1 - 2 * A2, A2], [A2, A2, 1 - 2 * A2],
]
const QW = [W1, W1, W1, W2, W2, W2]

/**
 * Real solid harmonics at (x, y, z) up to degree 4, written into out[idx(l, m)] (cos part) and
 * out[15 + idx(l, m)] (sin part), idx(l, m) = l(l+1)/2 + m. No Condon–Shortley phase.
 */
export function solidHarmonics(x: number, y: number, z: number, out: Float64Array): void {
  const r2 = x * x + y * y + z * z
  // sectoral: r^m P_mm (cos, sin)(mλ) = (2m−1)!! Re/Im (x + i y)^m
  let re = 1, im = 0, dfact = 1
  for (let m = 0; m <= L; m++) {
    if (m > 0) { const nre = re * x - im * y; im = re * y + im * x; re = nre; dfact *= 2 * m - 1 }
    const kmm = (m * (m + 1)) / 2 + m
    out[kmm] = dfact * re
    out[15 + kmm] = dfact * im
    if (m === L) break
    // l = m + 1: r^{m+1} P_{m+1,m} = (2m+1) z · r^m P_mm
    const k1 = ((m + 1) * (m + 2)) / 2 + m
    out[k1] = (2 * m + 1) * z * out[kmm]!
    out[15 + k1] = (2 * m + 1) * z * out[15 + kmm]!
    for (let l = m + 2; l <= L; l++) {
      const k = (l * (l + 1)) / 2 + m
      const ka = ((l - 1) * l) / 2 + m
      const kb = ((l - 2) * (l - 1)) / 2 + m
      out[k] = ((2 * l - 1) * z * out[ka]! - (l + m - 1) * r2 * out[kb]!) / (l - m)
      out[15 + k] = ((2 * l - 1) * z * out[15 + ka]! - (l + m - 1) * r2 * out[15 + kb]!) / (l - m)
    }
  }
}

/**
 * ∫_V r^l P_lm(sinφ){cos, sin}(mλ) dV over the polyhedron, after mapping every vertex p to
 * R·(p − origin) (R rows = target axes). Returns 30 values, layout as `solidHarmonics`.
 */
export function solidHarmonicIntegrals(mesh: TriMesh, origin: Vec3, R: Mat3): Float64Array {
  const P = mesh.positions
  const I = mesh.indices
  const nv = P.length / 3
  const Q = new Float64Array(P.length)
  const [r0, r1, r2] = R
  for (let v = 0; v < nv; v++) {
    const x = P[3 * v]! - origin[0], y = P[3 * v + 1]! - origin[1], z = P[3 * v + 2]! - origin[2]
    Q[3 * v] = r0[0] * x + r0[1] * y + r0[2] * z
    Q[3 * v + 1] = r1[0] * x + r1[1] * y + r1[2] * z
    Q[3 * v + 2] = r2[0] * x + r2[1] * y + r2[2] * z
  }
  const acc = new Float64Array(30)
  const h = new Float64Array(30)
  for (let f = 0; f < I.length; f += 3) {
    const a = 3 * I[f]!, b = 3 * I[f + 1]!, c = 3 * I[f + 2]!
    const ax = Q[a]!, ay = Q[a + 1]!, az = Q[a + 2]!
    const bx = Q[b]!, by = Q[b + 1]!, bz = Q[b + 2]!
    const cx = Q[c]!, cy = Q[c + 1]!, cz = Q[c + 2]!
    const v3 = (ax * (by * cz - bz * cy) + ay * (bz * cx - bx * cz) + az * (bx * cy - by * cx)) / 2 // 3·V_t
    for (let q = 0; q < 6; q++) {
      const w = QB[q]!
      const wq = QW[q]! * v3
      solidHarmonics(w[0]! * ax + w[1]! * bx + w[2]! * cx, w[0]! * ay + w[1]! * by + w[2]! * cy, w[0]! * az + w[1]! * bz + w[2]! * cz, h)
      for (let k = 0; k < 30; k++) acc[k] = acc[k]! + wq * h[k]!
    }
  }
  for (let l = 0; l <= L; l++) {
    for (let m = 0; m <= l; m++) {
      const k = (l * (l + 1)) / 2 + m
      acc[k] = acc[k]! / (l + 3)
      acc[15 + k] = acc[15 + k]! / (l + 3)
    }
  }
  return acc
}

export interface Harmonics {
  degree: number
  /** 'principal': axes of rotationToPrincipal, origin at the centroid. */
  frame: 'principal' | 'file'
  /** Reference radius R, m (C_lm ∝ R^−l). */
  referenceRadius: number
  /** Unnormalised C[l][m], S[l][m] (m ≤ l), C[0][0] = 1, degree-1 terms 0 about the centroid. */
  C: number[][]
  S: number[][]
  /** 4π-normalised C̄ = C/N_lm, S̄ = S/N_lm. */
  normalized: { C: number[][], S: number[][] }
}

/** Coefficients from the solid-harmonic integrals (per unit density: volume integrals). */
export function harmonicsFromIntegrals(ints: Float64Array, volume: number, R: number, frame: Harmonics['frame']): Harmonics {
  const C: number[][] = [], S: number[][] = [], Cn: number[][] = [], Sn: number[][] = []
  for (let l = 0; l <= L; l++) {
    C.push([]); S.push([]); Cn.push([]); Sn.push([])
    for (let m = 0; m <= l; m++) {
      const k = (l * (l + 1)) / 2 + m
      const f = (m === 0 ? 1 : 2) * factorial(l - m) / factorial(l + m) / (volume * R ** l)
      const c = ints[k]! * f, s = m === 0 ? 0 : ints[15 + k]! * f
      const n = kaulaNormalization(l, m)
      C[l]!.push(c); S[l]!.push(s); Cn[l]!.push(c / n); Sn[l]!.push(s / n)
    }
  }
  return { degree: L, frame, referenceRadius: R, C, S, normalized: { C: Cn, S: Sn } }
}

/** Same coefficients for another reference radius: C_lm' = C_lm (R/R')^l. */
export function rescaleHarmonics(h: Harmonics, R: number): Harmonics {
  const s = (l: number) => (h.referenceRadius / R) ** l
  const map = (A: number[][]) => A.map((row, l) => row.map(v => v * s(l)))
  return { ...h, referenceRadius: R, C: map(h.C), S: map(h.S), normalized: { C: map(h.normalized.C), S: map(h.normalized.S) } }
}

// ---- polynomials of degree ≤ 4 in (x, y, z): coefficient arrays over the 35 monomials ----
const MON = MOMENT_MONOMIALS
const MON_INDEX = new Map(MON.map((e, k) => [e.join(','), k]))
type Poly = Float64Array
const polyZero = (): Poly => new Float64Array(MON.length)
function polyMul(a: Poly, b: Poly): Poly {
  const r = polyZero()
  for (let p = 0; p < a.length; p++) {
    if (a[p] === 0) continue
    for (let q = 0; q < b.length; q++) {
      if (b[q] === 0) continue
      const e = [MON[p]![0] + MON[q]![0], MON[p]![1] + MON[q]![1], MON[p]![2] + MON[q]![2]]
      const k = MON_INDEX.get(e.join(','))
      if (k === undefined) throw new Error('polyMul: degree above 4')
      r[k] = r[k]! + a[p]! * b[q]!
    }
  }
  return r
}
const polyAdd = (a: Poly, b: Poly, sa = 1, sb = 1): Poly => a.map((v, k) => sa * v + sb * b[k]!)

/**
 * Solid-harmonic integrals ∫_V r'^l P_lm(sinφ'){cos, sin}(mλ') dV (layout as `solidHarmonics`) in the
 * frame x' = R·(x − g), from the polyhedron's monomial moments about some origin o:
 * moments[k] = ∫ x^i y^j z^k dV in MOMENT_MONOMIALS order (degree 0..4, `polyhedronMoments`), g relative to o.
 */
export function harmonicIntegralsFromMoments(moments: Float64Array, g: Vec3, R: Mat3): Float64Array {
  const lin = (r: Vec3): Poly => {
    const p = polyZero()
    p[0] = -(r[0] * g[0] + r[1] * g[1] + r[2] * g[2])
    p[1] = r[0]; p[2] = r[1]; p[3] = r[2]
    return p
  }
  const X = lin(R[0]), Y = lin(R[1]), Z = lin(R[2])
  const r2 = polyAdd(polyAdd(polyMul(X, X), polyMul(Y, Y)), polyMul(Z, Z))
  const cosP: Poly[] = new Array(15), sinP: Poly[] = new Array(15)
  let re = polyZero(); re[0] = 1
  let im = polyZero()
  let dfact = 1
  for (let m = 0; m <= L; m++) {
    if (m > 0) {
      const nre = polyAdd(polyMul(re, X), polyMul(im, Y), 1, -1)
      im = polyAdd(polyMul(re, Y), polyMul(im, X))
      re = nre
      dfact *= 2 * m - 1
    }
    const kmm = (m * (m + 1)) / 2 + m
    cosP[kmm] = re.map(v => v * dfact)
    sinP[kmm] = im.map(v => v * dfact)
    if (m === L) break
    const k1 = ((m + 1) * (m + 2)) / 2 + m
    cosP[k1] = polyMul(Z, cosP[kmm]!).map(v => v * (2 * m + 1))
    sinP[k1] = polyMul(Z, sinP[kmm]!).map(v => v * (2 * m + 1))
    for (let l = m + 2; l <= L; l++) {
      const k = (l * (l + 1)) / 2 + m, ka = ((l - 1) * l) / 2 + m, kb = ((l - 2) * (l - 1)) / 2 + m
      cosP[k] = polyAdd(polyMul(Z, cosP[ka]!), polyMul(r2, cosP[kb]!), (2 * l - 1) / (l - m), -(l + m - 1) / (l - m))
      sinP[k] = polyAdd(polyMul(Z, sinP[ka]!), polyMul(r2, sinP[kb]!), (2 * l - 1) / (l - m), -(l + m - 1) / (l - m))
    }
  }
  const out = new Float64Array(30)
  for (let k = 0; k < 15; k++) {
    let c = 0, s = 0
    for (let q = 0; q < MON.length; q++) { c += cosP[k]![q]! * moments[q]!; s += sinP[k]![q]! * moments[q]! }
    out[k] = c; out[15 + k] = s
  }
  return out
}
