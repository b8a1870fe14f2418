/**
 * Outside references for the treecode and coefficient tests: the closed-form potential of a
 * rectangular prism, exact gravity coefficients of a homogeneous ellipsoid from monomial moments,
 * and a finely gridded cube mesh.
 */
import type { TriMesh } from '#shared/geometry'

/**
 * Potential U/(Gρ) (m²) of the homogeneous prism [x1,x2]×[y1,y2]×[z1,z2] at point p: the closed form of
 * Nagy, Papp & Benedek 2000 (J. Geodesy 74, 552–560), with X = x − p etc.:
 *   U/(Gρ) = |||XY ln(Z + r) + YZ ln(X + r) + ZX ln(Y + r) − X²/2 atan(YZ/(Xr)) − Y²/2 atan(ZX/(Yr)) − Z²/2 atan(XY/(Zr))|||
 * over the eight corners with alternating signs [formula from memory: it is checked in the tests
 * against the published cube value of docs/polyhedral-gravity.md before being used]. Valid outside the prism
 * and away from its planes' extensions through the point (no zero coordinates at the corners).
 */
export function prismPotential(x1: number, x2: number, y1: number, y2: number, z1: number, z2: number, p: [number, number, number]): number {
  let s = 0
  for (const [X, sx] of [[x1 - p[0], -1], [x2 - p[0], 1]] as const) {
    for (const [Y, sy] of [[y1 - p[1], -1], [y2 - p[1], 1]] as const) {
      for (const [Z, sz] of [[z1 - p[2], -1], [z2 - p[2], 1]] as const) {
        const r = Math.hypot(X, Y, Z)
        const f = X * Y * Math.log(Z + r) + Y * Z * Math.log(X + r) + Z * X * Math.log(Y + r)
          - (X * X / 2) * Math.atan((Y * Z) / (X * r)) - (Y * Y / 2) * Math.atan((Z * X) / (Y * r)) - (Z * Z / 2) * Math.atan((X * Y) / (Z * r))
        s += sx * sy * sz * f
      }
    }
  }
  return s
}

/** Closed cube [−L/2, L/2]³ with an n×n grid of quads (two triangles each) on every side: 12n² faces, outward CCW. */
export function gridCube(L: number, n: number): TriMesh {
  const key = new Map<string, number>()
  const pos: number[] = []
  const idx: number[] = []
  const vertex = (c: [number, number, number]) => {
    const k = c.join(',')
    let v = key.get(k)
    if (v === undefined) {
      v = pos.length / 3
      key.set(k, v)
      pos.push(...c.map(t => (t / n - 0.5) * L))
    }
    return v
  }
  for (let a = 0; a < 3; a++) {
    const b = (a + 1) % 3, c = (a + 2) % 3
    for (const side of [0, n]) {
      for (let u = 0; u < n; u++) {
        for (let v = 0; v < n; v++) {
          const q = [[u, v], [u + 1, v], [u + 1, v + 1], [u, v + 1]].map(([i, j]) => {
            const p: [number, number, number] = [0, 0, 0]
            p[a] = side; p[b] = i!; p[c] = j!
            return vertex(p)
          })
          // b̂ × ĉ = â: this order faces +â; the side at 0 faces −â
          if (side === n) idx.push(q[0]!, q[1]!, q[2]!, q[0]!, q[2]!, q[3]!)
          else idx.push(q[0]!, q[2]!, q[1]!, q[0]!, q[3]!, q[2]!)
        }
      }
    }
  }
  return { positions: Float64Array.from(pos), indices: Uint32Array.from(idx) }
}

function fact(n: number): number { let f = 1; for (let i = 2; i <= n; i++) f *= i; return f }
function binom(n: number, k: number): number { return fact(n) / (fact(k) * fact(n - k)) }
/** Γ(k + ½) for integer k ≥ 0. */
function gammaHalf(k: number): number { let g = Math.sqrt(Math.PI); for (let i = 0; i < k; i++) g *= i + 0.5; return g }

/**
 * Mean of x^{2i} y^{2j} z^{2k} over the solid ellipsoid with semi-axes a, b, c (odd powers average to 0):
 * over the unit ball, ∫ u^{2i} v^{2j} w^{2k} dV = 2Γ(i+½)Γ(j+½)Γ(k+½) / ((2s+3) Γ(s+3/2)), s = i+j+k
 * (Folland 2001, "How to integrate a polynomial over a sphere", Amer. Math. Monthly 108, 446 [pub]),
 * divided by the ball's volume 4π/3, times a^{2i} b^{2j} c^{2k}.
 */
function ellipsoidMonomialMean(a: number, b: number, c: number, e: [number, number, number]): number {
  if (e.some(t => t % 2 === 1)) return 0
  const [i, j, k] = e.map(t => t / 2) as [number, number, number]
  const s = i + j + k
  const ball = (2 * gammaHalf(i) * gammaHalf(j) * gammaHalf(k)) / ((2 * s + 3) * gammaHalf(s + 1))
  return (ball / ((4 * Math.PI) / 3)) * a ** (2 * i) * b ** (2 * j) * c ** (2 * k)
}

/**
 * Exact unnormalised C_lm, S_lm of a homogeneous ellipsoid (semi-axes a, b, c along x, y, z, its
 * principal frame) with reference radius R, by expanding r^l P_lm(sin φ) e^{imλ} into monomials with
 * the explicit Legendre sum P_l(t) = 2^{−l} Σ_k (−1)^k C(l,k) C(2l−2k, l) t^{l−2k} and
 * P_lm = (1 − t²)^{m/2} d^m P_l/dt^m [pub, textbook; no Condon–Shortley phase]:
 *   r^l P_lm e^{imλ} = (x + iy)^m Σ_k (−1)^k C(l,k) C(2l−2k,l) 2^{−l} (l−2k)!/(l−2k−m)! z^{l−2k−m} r^{2k},
 * then averaging each monomial (ellipsoidMonomialMean). Independent of the polyhedron code: this is the
 * term-by-term content of Balmino's ellipsoid series (Balmino 1994, Celest. Mech. Dyn. Astron. 60, 331).
 */
export function ellipsoidCoefficient(a: number, b: number, c: number, R: number, l: number, m: number): { C: number, S: number } {
  let re = 0, im = 0
  for (let k = 0; 2 * k <= l - m; k++) {
    const coef = ((-1) ** k * binom(l, k) * binom(2 * l - 2 * k, l) * fact(l - 2 * k)) / (2 ** l * fact(l - 2 * k - m))
    const zp = l - 2 * k - m
    // (x + iy)^m = Σ_q C(m,q) x^{m−q} (iy)^q ; r^{2k} = Σ_{i+j+h=k} k!/(i!j!h!) x^{2i} y^{2j} z^{2h}
    for (let q = 0; q <= m; q++) {
      const iq = [1, 0, -1, 0][q % 4]!, imq = [0, 1, 0, -1][q % 4]!
      for (let i = 0; i <= k; i++) {
        for (let j = 0; i + j <= k; j++) {
          const h = k - i - j
          const mult = fact(k) / (fact(i) * fact(j) * fact(h))
          const mean = ellipsoidMonomialMean(a, b, c, [m - q + 2 * i, q + 2 * j, zp + 2 * h])
          const w = coef * binom(m, q) * mult * mean
          re += w * iq; im += w * imq
        }
      }
    }
  }
  const f = ((m === 0 ? 1 : 2) * fact(l - m)) / fact(l + m) / R ** l
  return { C: re * f, S: m === 0 ? 0 : im * f }
}
