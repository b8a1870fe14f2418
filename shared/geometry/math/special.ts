/** Small special functions shared by the harmonic expansions (mass/harmonics.ts, gravity/). */

/** n! as a float (exact to 22!, then rounded). */
export function factorial(n: number): number {
  let f = 1
  for (let i = 2; i <= n; i++) f *= i
  return f
}

/**
 * N_lm of the 4π (geodesy, "Kaula") normalisation, √[(2 − δ_m0)(2l + 1)(l − m)!/(l + m)!]:
 * C̄_lm = C_lm / N_lm (docs/conventions.md). (l − m)!/(l + m)! is formed as a product so that it
 * stays finite at high degree.
 */
export function kaulaNormalization(l: number, m: number): number {
  let q = 1
  for (let k = l - m + 1; k <= l + m; k++) q /= k
  return Math.sqrt((m === 0 ? 1 : 2) * (2 * l + 1) * q)
}
