/** Test helpers: tolerant comparisons, rotations, closed-form references. */
import { expect } from 'vitest'
import type { Mat3, TriMesh, Vec3 } from '#shared/geometry'

export function close(actual: number, expected: number, rtol: number, atol = 0): void {
  const tol = atol + rtol * Math.abs(expected)
  if (!(Math.abs(actual - expected) <= tol)) expect.fail(`expected ${actual} ≈ ${expected} (tol ${tol}, diff ${actual - expected})`)
}
export function closeVec(a: ArrayLike<number>, b: ArrayLike<number>, rtol: number, atol = 0): void {
  expect(a.length).toBe(b.length)
  for (let i = 0; i < a.length; i++) close(a[i]!, b[i]!, rtol, atol)
}
export function closeMat(a: number[][], b: number[][], rtol: number, atol = 0): void {
  for (let i = 0; i < a.length; i++) closeVec(a[i]!, b[i]!, rtol, atol)
}
/** Rotation matrix about a unit axis by angle (rad). */
export function axisAngle(axis: Vec3, ang: number): Mat3 {
  const n = Math.hypot(...axis)
  const [x, y, z] = [axis[0] / n, axis[1] / n, axis[2] / n]
  const c = Math.cos(ang), s = Math.sin(ang), t = 1 - c
  return [[t * x * x + c, t * x * y - s * z, t * x * z + s * y], [t * x * y + s * z, t * y * y + c, t * y * z - s * x], [t * x * z - s * y, t * y * z + s * x, t * z * z + c]]
}
/** Randomly permute vertex labels and face order (and rotate corners within faces). */
export function relabel(mesh: TriMesh, rnd: () => number): TriMesh {
  const nv = mesh.positions.length / 3, nf = mesh.indices.length / 3
  const perm = Array.from({ length: nv }, (_, i) => i)
  for (let i = nv - 1; i > 0; i--) { const j = Math.floor(rnd() * (i + 1)); [perm[i], perm[j]] = [perm[j]!, perm[i]!] }
  const positions = new Float64Array(3 * nv)
  for (let v = 0; v < nv; v++) for (let d = 0; d < 3; d++) positions[3 * perm[v]! + d] = mesh.positions[3 * v + d]!
  const forder = Array.from({ length: nf }, (_, i) => i)
  for (let i = nf - 1; i > 0; i--) { const j = Math.floor(rnd() * (i + 1)); [forder[i], forder[j]] = [forder[j]!, forder[i]!] }
  const indices = new Uint32Array(3 * nf)
  forder.forEach((f, k) => {
    const r = Math.floor(rnd() * 3)
    for (let c = 0; c < 3; c++) indices[3 * k + c] = perm[mesh.indices[3 * f + ((c + r) % 3)]!]!
  })
  return { positions, indices }
}

// Carlson symmetric elliptic integrals by duplication (Carlson 1995, Numer. Algorithms 10, 13–26).
export function carlsonRF(x: number, y: number, z: number): number {
  for (let i = 0; i < 100; i++) {
    const l = Math.sqrt(x * y) + Math.sqrt(y * z) + Math.sqrt(z * x)
    x = (x + l) / 4; y = (y + l) / 4; z = (z + l) / 4
    const m = (x + y + z) / 3
    if (Math.max(Math.abs(x - m), Math.abs(y - m), Math.abs(z - m)) / m < 1e-4) break
  }
  const m = (x + y + z) / 3, X = 1 - x / m, Y = 1 - y / m, Z = -X - Y
  const E2 = X * Y - Z * Z, E3 = X * Y * Z
  return (1 - E2 / 10 + E3 / 14 + (E2 * E2) / 24 - (3 * E2 * E3) / 44) / Math.sqrt(m)
}
export function carlsonRD(x: number, y: number, z: number): number {
  let sum = 0, fac = 1
  for (let i = 0; i < 100; i++) {
    const l = Math.sqrt(x * y) + Math.sqrt(y * z) + Math.sqrt(z * x)
    sum += fac / (Math.sqrt(z) * (z + l))
    fac /= 4
    x = (x + l) / 4; y = (y + l) / 4; z = (z + l) / 4
    const m = (x + y + 3 * z) / 5
    if (Math.max(Math.abs(x - m), Math.abs(y - m), Math.abs(z - m)) / m < 1e-4) break
  }
  const m = (x + y + 3 * z) / 5, X = 1 - x / m, Y = 1 - y / m, Z = -(X + Y) / 3
  const ea = X * Y, eb = Z * Z, ec = ea - eb, ed = ea - 6 * eb, ee = ed + ec + ec
  const s = 1 + ed * (-3 / 14 + (9 / 88) * ed - (9 / 52) * Z * ee) + Z * ((1 / 6) * ee + Z * ((-9 / 22) * ec + Z * (3 / 26) * ea))
  return 3 * sum + (fac * s) / (m * Math.sqrt(m))
}
/**
 * Exterior potential (U > 0) of a homogeneous ellipsoid, semi-axes a, b, c on x, y, z, mass M:
 * U = (3GM/4)∫_λ^∞ (1 − Σ x_i²/(a_i²+u)) du/Δ(u) (MacMillan 1930, The Theory of the Potential §
 * on ellipsoids; Chandrasekhar 1969, Ellipsoidal Figures of Equilibrium), written with Carlson's
 * R_F and R_D: ∫du/Δ = 2R_F, ∫du/((a²+u)Δ) = (2/3)R_D(b²+λ, c²+λ, a²+λ).
 */
export function ellipsoidPotential(a: number, b: number, c: number, GM: number, p: Vec3): number {
  const [x, y, z] = p
  const f = (l: number) => (x * x) / (a * a + l) + (y * y) / (b * b + l) + (z * z) / (c * c + l) - 1
  let lo = 0, hi = x * x + y * y + z * z + 1
  while (f(hi) > 0) hi *= 2
  for (let i = 0; i < 200; i++) { const m = (lo + hi) / 2; if (f(m) > 0) lo = m; else hi = m }
  const l = (lo + hi) / 2
  const A = a * a + l, B = b * b + l, C = c * c + l
  return (3 * GM / 4) * (2 * carlsonRF(A, B, C) - (2 / 3) * (x * x * carlsonRD(B, C, A) + y * y * carlsonRD(A, C, B) + z * z * carlsonRD(A, B, C)))
}
