import { describe, expect, it } from 'vitest'
import { icosphere, mergeMeshes } from '../../../shared/geometry/generate'
import { massProperties } from '../../../shared/geometry/mass'
import { breakupSpinPeriod, mergedBody, minimumDensityForPeriod } from '../../../shared/geometry/merged'
import type { Vec3 } from '../../../shared/geometry/types'

const G = 6.67430e-11

describe('merged body', () => {
  it('strengthless-sphere breakup period √(3π/(Gρ)) is 3.30 h at 1000 kg m⁻³', () => {
    // SCIENCE.md §5 [derived]: √(3π/(6.6743e-11·1000)) = 11883 s = 3.3009 h.
    expect(breakupSpinPeriod(1000) / 3600).toBeCloseTo(3.3009, 4)
    // Inverse: the density whose breakup period is 3.3009 h is 1000 kg m⁻³.
    expect(3 * Math.PI / (G * breakupSpinPeriod(1000) ** 2)).toBeCloseTo(1000, 8)
  })

  it('two separated spheres: inertia by the parallel-axis theorem, spin from L, neck stress sign', () => {
    // Parallel-axis theorem (Steiner), sphere I = 2MR²/5 (textbook closed forms, SCIENCE.md §1):
    // about the joint centre of mass, I_yy = I_zz = Σ(2/5 m_i R_i² + m_i r_i²), I_xx = Σ 2/5 m_i R_i².
    const R1 = 1, R2 = 0.6, d = 2, rho = 2000
    const A = icosphere(4, R1), B = icosphere(4, R2, [d, 0, 0])
    const union = mergeMeshes([A, B])
    const pA = massProperties(A, { density: rho }), pB = massProperties(icosphere(4, R2), { density: rho })
    const L: Vec3 = [0, 0, 3e6]
    const m = mergedBody({
      union, propsA: pA, propsB: pB, poseB: { quaternion: [1, 0, 0, 0], translation: [d, 0, 0] }, massModel: 'keep-density',
      orbitalAngularMomentum: L, orbitalAngularRate: 0, orbitNormal: [0, 0, 1], direction: [1, 0, 0], separation: d, neckArea: 0.1, spinA: 'none', spinB: 'none',
    })
    const m1 = rho * 4 / 3 * Math.PI * R1 ** 3, m2 = rho * 4 / 3 * Math.PI * R2 ** 3
    const r1 = d * m2 / (m1 + m2), r2 = d * m1 / (m1 + m2)
    const Ixx = 0.4 * (m1 * R1 ** 2 + m2 * R2 ** 2)
    const Izz = Ixx + m1 * r1 ** 2 + m2 * r2 ** 2
    // Level-4 icospheres: volume and moments low by ~2e-3 and ~4e-3 (SCIENCE.md §1 discretisation note).
    expect(Math.abs(m.inertia[0][0] / Ixx - 1)).toBeLessThan(6e-3)
    expect(Math.abs(m.inertia[2][2] / Izz - 1)).toBeLessThan(6e-3)
    expect(Math.abs(m.mass / (m1 + m2) - 1)).toBeLessThan(3e-3)
    // ω = I⁻¹L about z; relaxed period 2πC/|L|; L along the largest-moment axis → no tumble.
    expect(m.spinPeriod).toBeCloseTo(2 * Math.PI * m.inertia[2][2] / 3e6, 6)
    expect(m.relaxedSpinPeriod).toBeCloseTo(2 * Math.PI * m.principalMoments[2] / 3e6, 6)
    expect(m.tumbleAngleDeg).toBeLessThan(1e-6)
    // Point-mass separation period 2π√(d³/(GM)).
    expect(m.separationSpinPeriod / (2 * Math.PI * Math.sqrt(d ** 3 / (G * (pA.mass + pB.mass))))).toBeCloseTo(1, 12)
    // Neck stress, SCIENCE.md §6: F_n = m_B(ω²r_B − G m_A/d²) over the area.
    expect(m.spinPeriod).not.toBeNull()
    const w = 2 * Math.PI / m.spinPeriod!
    const rB = d * pA.mass / (pA.mass + pB.mass)
    const sigma = pB.mass * (w * w * rB - G * pA.mass / d ** 2) / 0.1
    expect(m.neckStress! / sigma).toBeCloseTo(1, 10)
    expect(sigma).not.toBe(0)
    // Conserve-mass: the same total mass at a raised density.
    const c = mergedBody({
      union, propsA: pA, propsB: pB, poseB: { quaternion: [1, 0, 0, 0], translation: [d, 0, 0] }, massModel: 'conserve-mass',
      orbitalAngularMomentum: L, orbitalAngularRate: 0, orbitNormal: [0, 0, 1], direction: [1, 0, 0], separation: d, neckArea: 0, spinA: 'none', spinB: 'none',
    })
    expect(c.mass).toBeCloseTo(pA.mass + pB.mass, 0)
    expect(c.neckStress).toBeNull()
  })

  it('minimum density keeping point-mass lobes together at a period inverts ω² = GM/d³', () => {
    // ρ = (2π/P)² d³/(G V): with P the separation period of ρ = 1500 we get 1500 back.
    const V = 5e9, d = 1500, rho = 1500
    const P = 2 * Math.PI * Math.sqrt(d ** 3 / (G * rho * V))
    expect(minimumDensityForPeriod(P, d, V)).toBeCloseTo(rho, 8)
  })
})
