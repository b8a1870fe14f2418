/**
 * Complex solid harmonics for multipole expansions of 1/|x − y| and exact polyhedron integrals.
 *
 * Normalisation (internal to the gravity modules; the published coefficients are converted in
 * coefficients.ts): with P_n^m WITHOUT the Condon–Shortley phase and (r, θ, φ) spherical
 * coordinates (θ from +z),
 *   regular    Υ_n^m(x) = r^n P_n^m(cos θ) e^{imφ} / (n+m)!
 *   irregular  Θ_n^m(x) = (n−m)! P_n^m(cos θ) e^{imφ} / r^{n+1}
 * and Υ_n^{−m} = (−1)^m conj(Υ_n^m), likewise Θ. Then (Legendre's addition theorem, e.g.
 * Jackson, Classical Electrodynamics §3.6 [pub, textbook]) for |y| < |x|
 *   1/|x − y| = Σ_n [Υ_n^0(y) Θ_n^0(x) + 2 Σ_{m≥1} Re(conj Υ_n^m(y) · Θ_n^m(x))],
 * and the regular harmonics translate as Υ_n^m(x + y) = Σ_{k,l} Υ_k^l(x) Υ_{n−k}^{m−l}(y)
 * (the same normalisation as Dehnen 2014, Comput. Astrophys. Cosmol. 1:1 [mem]; both identities
 * are checked numerically in tests/unit/gravity-solid-harmonics.test.ts).
 *
 * Storage: only m ≥ 0, complex numbers interleaved, entry j = n(n+1)/2 + m at [2j] (re), [2j+1] (im).
 *
 * Exact simplex integrals: the translation theorem makes Υ an exponential, Υ_n(x) = L(x)^{⊛n}/n!
 * with L(x) the degree-1 part {Υ_1^{−1}, Υ_1^0, Υ_1^1}(x) = {−(x − iy)/2, z, (x + iy)/2} and ⊛ the
 * product of the translation theorem. With barycentric weights λ and
 * ∫_triangle λ_a^i λ_b^j λ_c^k dS = 2A i! j! k!/(i+j+k+2)! (tetrahedron with the origin as fourth
 * vertex: 6V i! j! k!/(i+j+k+3)!) [pub, textbook]:
 *   ∫_triangle(a,b,c) Υ_n^m dS = 2A/(n+2)! · h_n^m,   ∫_tetra(0,a,b,c) Υ_n^m dV = 6V/(n+3)! · h_n^m,
 * h_n = Σ_{i+j+k=n} L_a^i ⊛ L_b^j ⊛ L_c^k (a complete homogeneous sum), built by the recursions
 * p_n = L_c ⊛ p_{n−1}, q_n = p_n + L_b ⊛ q_{n−1}, h_n = q_n + L_a ⊛ h_{n−1}: O(n²) work per face,
 * exact up to rounding for every degree.
 */

/** Number of stored (n, m ≥ 0) entries up to degree p. */
export function harmonicCount(p: number): number {
  return ((p + 1) * (p + 2)) / 2
}

/** Regular harmonics Υ_n^m(x, y, z) for n ≤ p into out (2·harmonicCount(p) numbers). */
export function regularHarmonics(x: number, y: number, z: number, p: number, out: Float64Array): void {
  const r2 = x * x + y * y + z * z
  let sre = 1, sim = 0 // Υ_m^m
  for (let m = 0; m <= p; m++) {
    if (m > 0) {
      const f = 1 / (2 * m)
      const nre = (sre * x - sim * y) * f
      sim = (sre * y + sim * x) * f
      sre = nre
    }
    let j = (m * (m + 1)) / 2 + m
    out[2 * j] = sre; out[2 * j + 1] = sim
    if (m === p) break
    j = ((m + 1) * (m + 2)) / 2 + m
    out[2 * j] = z * sre; out[2 * j + 1] = z * sim
    for (let n = m + 2; n <= p; n++) {
      const k = (n * (n + 1)) / 2 + m, ka = ((n - 1) * n) / 2 + m, kb = ((n - 2) * (n - 1)) / 2 + m
      const f = 1 / ((n + m) * (n - m)), c1 = (2 * n - 1) * z
      out[2 * k] = (c1 * out[2 * ka]! - r2 * out[2 * kb]!) * f
      out[2 * k + 1] = (c1 * out[2 * ka + 1]! - r2 * out[2 * kb + 1]!) * f
    }
  }
}

/** Irregular harmonics Θ_n^m(x, y, z) for n ≤ p into out (2·harmonicCount(p) numbers); x ≠ 0. */
export function irregularHarmonics(x: number, y: number, z: number, p: number, out: Float64Array): void {
  const r2 = x * x + y * y + z * z
  const ir2 = 1 / r2
  let sre = Math.sqrt(ir2), sim = 0 // Θ_m^m
  for (let m = 0; m <= p; m++) {
    if (m > 0) {
      const f = (2 * m - 1) * ir2
      const nre = (sre * x - sim * y) * f
      sim = (sre * y + sim * x) * f
      sre = nre
    }
    let j = (m * (m + 1)) / 2 + m
    out[2 * j] = sre; out[2 * j + 1] = sim
    if (m === p) break
    j = ((m + 1) * (m + 2)) / 2 + m
    const f1 = (2 * m + 1) * z * ir2
    out[2 * j] = f1 * sre; out[2 * j + 1] = f1 * sim
    for (let n = m + 2; n <= p; n++) {
      const k = (n * (n + 1)) / 2 + m, ka = ((n - 1) * n) / 2 + m, kb = ((n - 2) * (n - 1)) / 2 + m
      const c1 = (2 * n - 1) * z * ir2, c2 = ((n - 1) * (n - 1) - m * m) * ir2
      out[2 * k] = c1 * out[2 * ka]! - c2 * out[2 * kb]!
      out[2 * k + 1] = c1 * out[2 * ka + 1]! - c2 * out[2 * kb + 1]!
    }
  }
}

/**
 * dst_n = src_n + L(x, y, z) ⊛ prev_{n−1} for one degree n ≥ 1 (all m = 0..n), src optional (null: 0).
 * All three arrays use the layout above; prev holds degree n−1 at its usual place.
 * (L⊛X)_n^m = L^1 X_{n−1}^{m−1} + L^0 X_{n−1}^m + L^{−1} X_{n−1}^{m+1}, L^1 = (x + iy)/2, L^0 = z,
 * L^{−1} = −(x − iy)/2, X_{n−1}^{−1} = −conj X_{n−1}^1, X_{n−1}^m = 0 for m > n − 1.
 */
function convolveDegree(x: number, y: number, z: number, n: number, prev: Float64Array, src: Float64Array | null, dst: Float64Array): void {
  const hx = 0.5 * x, hy = 0.5 * y
  const b = n * (n + 1) // 2 × start of degree n
  const bp = (n - 1) * n // 2 × start of degree n − 1
  // m = 0: z X^0 − 2 Re(L^1 conj X^1)
  let re = z * prev[bp]!
  if (n >= 2) re -= 2 * (hx * prev[bp + 2]! + hy * prev[bp + 3]!)
  dst[b] = src ? src[b]! + re : re
  dst[b + 1] = src ? src[b + 1]! : 0
  // 1 ≤ m ≤ n − 2: all three terms
  for (let m = 1; m <= n - 2; m++) {
    const o = bp + 2 * m
    const ar = prev[o - 2]!, ai = prev[o - 1]!, br = prev[o]!, bi = prev[o + 1]!, cr = prev[o + 2]!, ci = prev[o + 3]!
    const r = hx * ar - hy * ai + z * br - hx * cr - hy * ci
    const i = hx * ai + hy * ar + z * bi - hx * ci + hy * cr
    const j = b + 2 * m
    if (src) { dst[j] = src[j]! + r; dst[j + 1] = src[j + 1]! + i }
    else { dst[j] = r; dst[j + 1] = i }
  }
  // m = n − 1 (≥ 1): L^1 X^{n−2} + z X^{n−1}
  if (n >= 2) {
    const o = bp + 2 * (n - 1)
    const ar = prev[o - 2]!, ai = prev[o - 1]!, br = prev[o]!, bi = prev[o + 1]!
    const r = hx * ar - hy * ai + z * br, i = hx * ai + hy * ar + z * bi
    const j = b + 2 * (n - 1)
    if (src) { dst[j] = src[j]! + r; dst[j + 1] = src[j + 1]! + i }
    else { dst[j] = r; dst[j + 1] = i }
  }
  // m = n: L^1 X^{n−1}
  {
    const o = bp + 2 * (n - 1)
    const ar = prev[o]!, ai = prev[o + 1]!
    const r = hx * ar - hy * ai, i = hx * ai + hy * ar
    const j = b + 2 * n
    if (src) { dst[j] = src[j]! + r; dst[j + 1] = src[j + 1]! + i }
    else { dst[j] = r; dst[j + 1] = i }
  }
}

/**
 * h_n^m = Σ_{i+j+k=n} (L_a^i ⊛ L_b^j ⊛ L_c^k)_n^m for n ≤ p, written to h; p, q are scratch of the same
 * size (2·harmonicCount(p)). Then ∫_triangle Υ_n^m dS = 2A h_n^m/(n+2)! and
 * ∫_tetra(0,a,b,c) Υ_n^m dV = 6V h_n^m/(n+3)!. Vertices relative to the expansion centre.
 */
export function simplexHarmonicSums(ax: number, ay: number, az: number, bx: number, by: number, bz: number, cx: number, cy: number, cz: number,
  p: number, h: Float64Array, pc: Float64Array, qb: Float64Array): void {
  h[0] = 1; h[1] = 0; pc[0] = 1; pc[1] = 0; qb[0] = 1; qb[1] = 0
  for (let n = 1; n <= p; n++) {
    convolveDegree(cx, cy, cz, n, pc, null, pc)
    convolveDegree(bx, by, bz, n, qb, pc, qb)
    convolveDegree(ax, ay, az, n, h, qb, h)
  }
}

/** Scratch for `translateMoments` (order p, `count` density sets). */
export interface TranslationScratch { ys: Float64Array, yf: Float64Array, sf: Float64Array }
export function translationScratch(p: number, count: number): TranslationScratch {
  const full = (p + 1) * (p + 1)
  return { ys: new Float64Array(2 * harmonicCount(p)), yf: new Float64Array(2 * full), sf: new Float64Array(2 * count * full) }
}

/**
 * M2M: adds to dst the moments src (about centre c_src) translated to the centre c_dst, s = c_src − c_dst:
 * dst_n^m += Σ_{k,l} Υ_k^l(s) src_{n−k}^{m−l}. `count` interleaved density sets: entry j of set d is at
 * [offset + 2(count·j + d)], [+1]. Both sides are expanded to all m (negative m by the conjugate
 * symmetry) first, so the inner loops have no branches.
 */
export function translateMoments(src: Float64Array, srcOffset: number, sx: number, sy: number, sz: number, p: number, count: number,
  dst: Float64Array, dstOffset: number, scratch: TranslationScratch): void {
  const { ys, yf, sf } = scratch
  regularHarmonics(sx, sy, sz, p, ys)
  const c2 = 2 * count
  for (let n = 0; n <= p; n++) {
    const b = (n * (n + 1)) / 2, f = n * n + n
    for (let m = 0; m <= n; m++) {
      const yr = ys[2 * (b + m)]!, yi = ys[2 * (b + m) + 1]!
      yf[2 * (f + m)] = yr; yf[2 * (f + m) + 1] = yi
      const sg = m & 1 ? -1 : 1
      yf[2 * (f - m)] = sg * yr; yf[2 * (f - m) + 1] = -sg * yi
      const js = srcOffset + c2 * (b + m), jp = c2 * (f + m), jn = c2 * (f - m)
      for (let d = 0; d < c2; d += 2) {
        const xr = src[js + d]!, xi = src[js + d + 1]!
        sf[jp + d] = xr; sf[jp + d + 1] = xi
        sf[jn + d] = sg * xr; sf[jn + d + 1] = -sg * xi
      }
    }
  }
  for (let n = 0; n <= p; n++) {
    for (let m = 0; m <= n; m++) {
      const jd = dstOffset + c2 * ((n * (n + 1)) / 2 + m)
      for (let k = 0; k <= n; k++) {
        const nk = n - k
        const lmin = Math.max(-k, m - nk), lmax = Math.min(k, m + nk)
        const fy = k * k + k, fs = nk * nk + nk + m
        if (count === 4) {
          let a0 = 0, a1 = 0, a2 = 0, a3 = 0, a4 = 0, a5 = 0, a6 = 0, a7 = 0
          for (let l = lmin; l <= lmax; l++) {
            const yr = yf[2 * (fy + l)]!, yi = yf[2 * (fy + l) + 1]!
            const o = 8 * (fs - l)
            const x0 = sf[o]!, x1 = sf[o + 1]!, x2 = sf[o + 2]!, x3 = sf[o + 3]!, x4 = sf[o + 4]!, x5 = sf[o + 5]!, x6 = sf[o + 6]!, x7 = sf[o + 7]!
            a0 += yr * x0 - yi * x1; a1 += yr * x1 + yi * x0
            a2 += yr * x2 - yi * x3; a3 += yr * x3 + yi * x2
            a4 += yr * x4 - yi * x5; a5 += yr * x5 + yi * x4
            a6 += yr * x6 - yi * x7; a7 += yr * x7 + yi * x6
          }
          dst[jd] = dst[jd]! + a0; dst[jd + 1] = dst[jd + 1]! + a1; dst[jd + 2] = dst[jd + 2]! + a2; dst[jd + 3] = dst[jd + 3]! + a3
          dst[jd + 4] = dst[jd + 4]! + a4; dst[jd + 5] = dst[jd + 5]! + a5; dst[jd + 6] = dst[jd + 6]! + a6; dst[jd + 7] = dst[jd + 7]! + a7
        }
        else {
          for (let l = lmin; l <= lmax; l++) {
            const yr = yf[2 * (fy + l)]!, yi = yf[2 * (fy + l) + 1]!
            const o = c2 * (fs - l)
            for (let d = 0; d < c2; d += 2) {
              const xr = sf[o + d]!, xi = sf[o + d + 1]!
              dst[jd + d] = dst[jd + d]! + yr * xr - yi * xi
              dst[jd + d + 1] = dst[jd + d + 1]! + yr * xi + yi * xr
            }
          }
        }
      }
    }
  }
}
