/**
 * Exterior gravity-field coefficients of a constant-density closed polyhedron to high degree, exact
 * for the polyhedron (up to rounding).
 *
 * Convention (docs/conventions.md): U = (GM/r)[1 + Σ_{l≥1} Σ_m (R/r)^l P_lm(sin φ)(C_lm cos mλ + S_lm sin mλ)],
 * P_lm without the Condon–Shortley phase, φ latitude, λ longitude from +x towards +y, r from the
 * volume centroid, so that C_lm, S_lm = (2 − δ_m0)(l−m)!/(l+m)! (1/(M R^l)) ∫ r^l P_lm(sin φ){cos, sin}(mλ) dm
 * (Kaula 1966, Theory of Satellite Geodesy [pub, textbook]; docs/harmonics.md). 4π (Kaula) normalisation:
 * C̄_lm = C_lm/N_lm, N_lm = √[(2 − δ_m0)(2l+1)(l−m)!/(l+m)!].
 *
 * Method: r^l P_lm e^{imλ} = (l+m)! Υ_l^m (solid-harmonics.ts), and the volume integral over the
 * signed tetrahedra (centroid, face) is exact per tetrahedron: ∫ Υ_l^m dV = 6V_t h_l^m/(l+3)!
 * (`simplexHarmonicSums`, O(l²) per face). Coordinates are scaled by 1/R first so the sums stay
 * near unity. The same quantities are what Werner 1997 (Computers & Geosciences 23(10)) computes by
 * a different recursion.
 *
 * Work can be split: `coefficientSums` over face ranges (worker chunks), summed, then
 * `coefficientsFromSums`.
 */
import type { Mat3, TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import { G } from '../mass/mass'
import { factorial, kaulaNormalization } from '../math/special'
import { harmonicCount, simplexHarmonicSums } from './solid-harmonics'

export const DEFAULT_COEFFICIENT_DEGREE = 16
export const MAX_COEFFICIENT_DEGREE = 64

/** The frame the coefficients refer to: origin at the volume centroid, axes = rows of `axes` (file-frame components). */
export interface CoefficientFrame {
  kind: 'principal' | 'file'
  /** Volume centroid, file frame, m. */
  origin: Vec3
  /** Rows: the frame's x, y, z axes in file-frame components (identity for 'file'). */
  axes: Mat3
}

export interface GravityCoefficients {
  degree: number
  /** Reference radius R, m (C_lm ∝ R^−l). */
  referenceRadius: number
  /** GM, m³ s⁻² (G = 6.67430e-11, CODATA 2018). */
  GM: number
  density: number
  frame: CoefficientFrame
  /** How C̄, S̄ relate to C, S; the P_lm and expansion used. */
  normalization: string
  /** Unnormalised C[l][m], S[l][m] (m ≤ l), C[0][0] = 1; degree 1 vanishes about the centroid. */
  C: number[][]
  S: number[][]
  /** 4π (Kaula) normalised. */
  Cbar: number[][]
  Sbar: number[][]
}

export const NORMALIZATION_NOTE = 'C, S unnormalised; Cbar, Sbar 4π (Kaula) normalised: Cbar_lm = C_lm / sqrt((2 − δ_m0)(2l+1)(l−m)!/(l+m)!). '
  + 'U = (GM/r)[1 + Σ_l Σ_m (R/r)^l P_lm(sin φ)(C_lm cos mλ + S_lm sin mλ)], P_lm without the Condon–Shortley phase, '
  + 'r from the volume centroid, φ latitude, λ longitude from +x towards +y of the stated frame; J_l = −C_l0; U > 0.'

/**
 * Σ over faces [start, end) of 6V_t·h_l^m (the tetrahedra centroid–face) in the frame x′ = axes·(x − origin)/R,
 * layout of solid-harmonics.ts (2·harmonicCount(degree) numbers), added to `out` (returned).
 */
export function coefficientSums(mesh: TriMesh, frame: CoefficientFrame, R: number, degree: number, start = 0, end = mesh.indices.length / 3,
  out: Float64Array = new Float64Array(2 * harmonicCount(degree)), onProgress?: (fraction: number) => void): Float64Array {
  const P = mesh.positions, I = mesh.indices
  const nv = P.length / 3
  const [o0, o1, o2] = frame.origin
  const [r0, r1, r2] = frame.axes
  const Q = new Float64Array(3 * nv)
  const s = 1 / R
  for (let v = 0; v < nv; v++) {
    const x = P[3 * v]! - o0, y = P[3 * v + 1]! - o1, z = P[3 * v + 2]! - o2
    Q[3 * v] = (r0[0] * x + r0[1] * y + r0[2] * z) * s
    Q[3 * v + 1] = (r1[0] * x + r1[1] * y + r1[2] * z) * s
    Q[3 * v + 2] = (r2[0] * x + r2[1] * y + r2[2] * z) * s
  }
  const T = harmonicCount(degree)
  const h = new Float64Array(2 * T), a = new Float64Array(2 * T), b = new Float64Array(2 * T)
  const step = Math.max(1, Math.ceil((end - start) / 20))
  for (let f = start; f < end; f++) {
    const ia = 3 * I[3 * f]!, ib = 3 * I[3 * f + 1]!, ic = 3 * I[3 * f + 2]!
    const ax = Q[ia]!, ay = Q[ia + 1]!, az = Q[ia + 2]!
    const bx = Q[ib]!, by = Q[ib + 1]!, bz = Q[ib + 2]!
    const cx = Q[ic]!, cy = Q[ic + 1]!, cz = Q[ic + 2]!
    const det = ax * (by * cz - bz * cy) + ay * (bz * cx - bx * cz) + az * (bx * cy - by * cx) // 6 V_t
    simplexHarmonicSums(ax, ay, az, bx, by, bz, cx, cy, cz, degree, h, a, b)
    for (let j = 0; j < 2 * T; j++) out[j] = out[j]! + det * h[j]!
    if (onProgress && (f - start + 1) % step === 0) onProgress((f - start + 1) / (end - start))
  }
  return out
}

/**
 * Coefficients from the summed `coefficientSums` (same frame and R). volume: m³ (the sums' degree-0
 * term is 6V/R³·1, so it is taken from them when volume is not given).
 */
export function coefficientsFromSums(sums: Float64Array, degree: number, R: number, density: number, frame: CoefficientFrame): GravityCoefficients {
  // ∫ Υ_l^m dV′ (scaled units) = sums/(l+3)!; degree 0: h = 1, so sums[0] = Σ 6V_t = 6V′
  const volumeScaled = sums[0]! / 6
  const C: number[][] = [], S: number[][] = [], Cbar: number[][] = [], Sbar: number[][] = []
  for (let l = 0; l <= degree; l++) {
    C.push([]); S.push([]); Cbar.push([]); Sbar.push([])
    const inv = 1 / factorial(l + 3)
    for (let m = 0; m <= l; m++) {
      const j = (l * (l + 1)) / 2 + m
      // C_lm = (2 − δ)(l−m)!/(l+m)!/V′ · (l+m)! Re∫Υ = (2 − δ)(l−m)! Re∫Υ / V′
      const f = ((m === 0 ? 1 : 2) * factorial(l - m)) / volumeScaled * inv
      const c = sums[2 * j]! * f, s = m === 0 ? 0 : sums[2 * j + 1]! * f
      const n = kaulaNormalization(l, m)
      C[l]!.push(c); S[l]!.push(s); Cbar[l]!.push(c / n); Sbar[l]!.push(s / n)
    }
  }
  const volume = volumeScaled * R * R * R
  return { degree, referenceRadius: R, GM: G * density * volume, density, frame, normalization: NORMALIZATION_NOTE, C, S, Cbar, Sbar }
}

/**
 * Coefficients to `degree` on one thread (split with coefficientSums for workers).
 * @throws GeometryError 'bad-argument' for a degree outside [0, 64] or R ≤ 0.
 */
export function gravityCoefficients(mesh: TriMesh, opts: { degree?: number, referenceRadius: number, density: number, frame: CoefficientFrame }, onProgress?: (fraction: number) => void): GravityCoefficients {
  const degree = opts.degree ?? DEFAULT_COEFFICIENT_DEGREE
  checkCoefficientArgs(degree, opts.referenceRadius)
  const sums = coefficientSums(mesh, opts.frame, opts.referenceRadius, degree, 0, mesh.indices.length / 3, undefined, onProgress)
  return coefficientsFromSums(sums, degree, opts.referenceRadius, opts.density, opts.frame)
}

export function checkCoefficientArgs(degree: number, R: number): void {
  if (!Number.isInteger(degree) || degree < 0 || degree > MAX_COEFFICIENT_DEGREE) throw new GeometryError('bad-argument', `gravityCoefficients: degree must be an integer in [0, ${MAX_COEFFICIENT_DEGREE}], got ${degree}`)
  if (!(R > 0) || !Number.isFinite(R)) throw new GeometryError('bad-argument', `gravityCoefficients: referenceRadius must be a positive finite number of metres, got ${R}`)
}

/**
 * The series potential U (m² s⁻², > 0) at a point of the coefficients' frame (m, relative to its
 * origin), summed to `maxDegree` (default: all). For checks and plots outside the Brillouin sphere.
 */
export function seriesPotential(c: GravityCoefficients, x: number, y: number, z: number, maxDegree = c.degree): number {
  const r = Math.hypot(x, y, z)
  const sinPhi = z / r, cosPhi = Math.hypot(x, y) / r
  const lam = Math.atan2(y, x)
  // P_lm(sin φ) without the Condon–Shortley phase, by the standard recurrences
  let sum = 1
  const L = Math.min(maxDegree, c.degree)
  let pmm = 1 // P_mm
  for (let m = 0; m <= L; m++) {
    if (m > 0) pmm *= (2 * m - 1) * cosPhi
    const cm = Math.cos(m * lam), sm = Math.sin(m * lam)
    let p2 = 0, p1 = pmm // P_{l−2,m}, P_{l−1,m}
    for (let l = m; l <= L; l++) {
      let plm: number
      if (l === m) plm = pmm
      else if (l === m + 1) plm = (2 * m + 1) * sinPhi * pmm
      else plm = ((2 * l - 1) * sinPhi * p1 - (l + m - 1) * p2) / (l - m)
      if (l > m) { p2 = p1; p1 = plm }
      if (l >= 1) sum += (c.referenceRadius / r) ** l * plm * (c.C[l]![m]! * cm + c.S[l]![m]! * sm)
    }
  }
  return (c.GM / r) * sum
}

/** Degree variances σ_l² = Σ_m (C̄_lm² + S̄_lm²) of the normalised coefficients (dimensionless), l = 0..degree. */
export function degreeVariances(c: GravityCoefficients): number[] {
  return c.Cbar.map((row, l) => row.reduce((s, v, m) => s + v * v + c.Sbar[l]![m]! ** 2, 0))
}
