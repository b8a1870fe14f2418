import { describe, expect, it } from 'vitest'
import { boxMesh, MOMENT_MONOMIALS, polyhedronMoments, transformMesh } from '#shared/geometry'
import type { TriMesh, Vec3 } from '#shared/geometry'
import { close } from './helpers'

const fact = (n: number): number => (n <= 1 ? 1 : n * fact(n - 1))

/** The standard simplex (0, e_x, e_y, e_z), faces wound outward. */
function unitSimplex(t: Vec3 = [0, 0, 0]): TriMesh {
  const positions = Float64Array.from([0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0, 1].map((v, i) => v + t[i % 3]!))
  return { positions, indices: Uint32Array.from([0, 2, 1, 0, 1, 3, 0, 3, 2, 1, 2, 3]) }
}

describe('polyhedronMoments: monomial moments to degree 4 in closed form', () => {
  it('standard simplex: ∫ x^i y^j z^k dV = i! j! k!/(i+j+k+3)! for all 35 monomials (Dirichlet\'s integral; e.g. Grundmann & Möller 1978, SIAM J. Numer. Anal. 15(2):282–290; citation from memory)', () => {
    const { moments, surfaceArea } = polyhedronMoments(unitSimplex(), [0, 0, 0])
    MOMENT_MONOMIALS.forEach(([i, j, k], n) => close(moments[n]!, fact(i) * fact(j) * fact(k) / fact(i + j + k + 3), 1e-14))
    close(surfaceArea, 1.5 + Math.sqrt(3) / 2, 1e-15) // three right triangles of area ½ and an equilateral one of side √2
  })

  it('the same simplex far from the file origin, moments about its corner: unchanged (translation; common practice, no source)', () => {
    const t: Vec3 = [1.5e4, -2.2e4, 7.0e3]
    const { moments } = polyhedronMoments(unitSimplex(t), t)
    MOMENT_MONOMIALS.forEach(([i, j, k], n) => close(moments[n]!, fact(i) * fact(j) * fact(k) / fact(i + j + k + 3), 2e-10))
  })

  it('box 2a × 2b × 2c about its centre: ∫ x^i y^j z^k dV = Π 2a^(i+1)/(i+1) for even exponents, 0 otherwise (elementary closed form)', () => {
    const [a, b, c] = [1.5, 2.5, 0.75]
    const centre: Vec3 = [40, -12, 3]
    const { moments } = polyhedronMoments(boxMesh(2 * a, 2 * b, 2 * c, centre), centre)
    const one = (h: number, e: number) => (e % 2 ? 0 : (2 * h ** (e + 1)) / (e + 1))
    MOMENT_MONOMIALS.forEach(([i, j, k], n) => {
      const expected = one(a, i) * one(b, j) * one(c, k)
      close(moments[n]!, expected, 1e-12, 1e-12 * one(a, 4) * one(b, 0) * one(c, 0))
    })
  })

  it('a rotated box: ∫ (u·x)⁴ dV along the box axis u equals 2a⁵/5 · 4bc (rotation; elementary closed form)', () => {
    const [a, b, c] = [3, 1, 2]
    const ang = 0.7
    const R: [Vec3, Vec3, Vec3] = [[Math.cos(ang), -Math.sin(ang), 0], [Math.sin(ang), Math.cos(ang), 0], [0, 0, 1]]
    const { moments } = polyhedronMoments(transformMesh(boxMesh(2 * a, 2 * b, 2 * c), R), [0, 0, 0])
    // the box's x axis is u = R e_x; expand (u·x)⁴ over the degree-4 monomials with multinomial weights
    const u: Vec3 = [R[0][0], R[1][0], R[2][0]]
    let sum = 0
    MOMENT_MONOMIALS.forEach(([i, j, k], n) => {
      if (i + j + k === 4) sum += (fact(4) / (fact(i) * fact(j) * fact(k))) * u[0] ** i * u[1] ** j * u[2] ** k * moments[n]!
    })
    close(sum, (2 * a ** 5 / 5) * 4 * b * c, 1e-13)
    expect(MOMENT_MONOMIALS).toHaveLength(35)
  })
})
