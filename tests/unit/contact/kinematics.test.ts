import { describe, expect, it } from 'vitest'
import { contactKinematics, pathwayScreen } from '#shared/geometry'
import type { Vec3 } from '#shared/geometry'

// Worked example (computed by hand, docs/contact-and-kinematics.md formulas; G = 6.67430e-11, CODATA 2018):
// m_A = 4e12 kg, m_B = 1e12 kg → GM = 6.6743e-11 × 5e12 = 333.715 m³ s⁻².
// d = 2000 m: v_esc = √(2·333.715/2000) = √0.333715 = 0.577681 m/s.
// Bound a = 4000 m, e = 0.6 (q = 1600 ≤ d ≤ Q = 6400):
//   vis-viva v = √(333.715·(2/2000 − 1/4000)) = √0.250286 = 0.500286 m/s;
//   h = √(GM a (1 − e²)) = √(333.715·4000·0.64) = 924.289 m²/s → v_t = h/d = 0.462145 m/s;
//   v_r = √(v² − v_t²) = 0.191595 m/s; angle from the line of centres atan(v_t/v_r) = 67.482°;
//   L = μh = 8e11 · 924.289 = 7.39431e14 kg m² s⁻¹.
const base = { massA: 4e12, massB: 1e12, separation: 2000, direction: [1, 0, 0] as Vec3, orbitNormal: [0, 0, 1] as Vec3, equivalentRadiusA: 1200, equivalentRadiusB: 800 }

describe('contactKinematics', () => {
  it('vis-viva, escape speed, components and angular momentum on a bound orbit (worked example above)', () => {
    const r = contactKinematics({ ...base, orbit: { kind: 'bound', semiMajorAxis: 4000, eccentricity: 0.6 } })
    if (!r.contact) throw new Error('expected contact')
    expect(r.escapeSpeed).toBeCloseTo(0.577681, 6)
    expect(r.speed).toBeCloseTo(0.500286, 6)
    expect(r.tangentialSpeed).toBeCloseTo(0.462145, 6)
    expect(r.radialSpeed).toBeCloseTo(0.191595, 6)
    expect(r.impactAngleFromNormalDeg).toBeCloseTo(67.482, 3)
    expect(r.impactAngleFromTangentDeg).toBeCloseTo(90 - 67.482, 3)
    expect(r.orbitalAngularMomentum[2]).toBeCloseTo(7.39431e14, -9)
    expect(r.massRatio).toBe(0.25)
    // √(2GM/(R1+R2)) = √(667.43/2000) — here R1+R2 = d, so equal to the escape speed.
    expect(r.sphereEquivalentEscapeSpeed).toBeCloseTo(0.577681, 6)
    // Relative velocity: inward along −x, prograde about +z (along +y).
    expect(r.relativeVelocity[0]).toBeLessThan(0)
    expect(r.relativeVelocity[1]).toBeGreaterThan(0)
  })

  it('parabolic head-on approach arrives at exactly the escape speed, angle 0', () => {
    // v² = 2GM/d for a parabolic orbit (vis-viva with 1/a = 0).
    const r = contactKinematics({ ...base, orbit: { kind: 'parabolic' } })
    if (!r.contact) throw new Error('expected contact')
    expect(r.speed / r.escapeSpeed).toBeCloseTo(1, 14)
    expect(r.tangentialSpeed).toBe(0)
    expect(r.impactAngleFromNormalDeg).toBeCloseTo(0, 10)
    expect(r.impactAngleFromTangentDeg).toBeCloseTo(90, 10)
  })

  it('hyperbolic: v = √(v∞² + 2GM/d), h = q·v_q', () => {
    // v∞ = 0.3 m/s, q = 500 m: v = √(0.09 + 0.333715) = 0.650934 m/s;
    // v_q = √(0.09 + 2·333.715/500) = 1.193675 m/s, v_t = q v_q / d = 0.298419 m/s (hand computed).
    const r = contactKinematics({ ...base, orbit: { kind: 'hyperbolic', vInfinity: 0.3, pericentre: 500 } })
    if (!r.contact) throw new Error('expected contact')
    expect(r.speed).toBeCloseTo(0.650934, 6)
    expect(r.tangentialSpeed).toBeCloseTo(0.298419, 6)
  })

  it('circular orbit at a = d is grazing contact: no radial speed, 90° from the normal', () => {
    // Circular speed √(GM/d) = √(333.715/2000) = 0.408482 m/s.
    const r = contactKinematics({ ...base, orbit: { kind: 'bound', semiMajorAxis: 2000, eccentricity: 0 } })
    if (!r.contact) throw new Error('expected contact')
    expect(r.radialSpeed).toBe(0)
    expect(r.speed).toBeCloseTo(0.408482, 6)
    expect(r.impactAngleFromNormalDeg).toBeCloseTo(90, 6)
  })

  it('no contact when the pericentre lies beyond the contact separation', () => {
    const r = contactKinematics({ ...base, orbit: { kind: 'bound', semiMajorAxis: 4000, eccentricity: 0.4 } })
    expect(r.contact).toBe(false)
    if (r.contact) return
    expect(r.pericentre).toBeCloseTo(2400, 9)
    expect(r.separation).toBe(2000)
    const h = contactKinematics({ ...base, orbit: { kind: 'hyperbolic', vInfinity: 1, pericentre: 2500 } })
    expect(h.contact).toBe(false)
  })
})

describe('pathwayScreen', () => {
  // Worked values (hand computed; GM☉ = 1.3271244e20 (IAU 2015 B3), au = 149 597 870 700 m):
  // m = 3e-18 M☉ = 5.965230e12 kg → r_H = a_hel (m/(3M☉))^{1/3} = 1e-6 a_hel (Murray & Dermott 1999).
  // With a_hel = 2 au, e_hel = 0.1, a = 2 km: GM_in = 398.1373, P_in = 2π√(a³/GM_in) = 28164.9 s,
  // P_out = 2π√(a_hel³/(GM☉+GM_in)) = 8.926006e7 s,
  // t_KL = (8/(15π)) P_out²/P_in (1 − 0.01)^{3/2} = 4.730506e10 s (Antognini 2015, K = 8/(15π)).
  // e_max at i = 60°: √(1 − (5/3)·¼) = √(7/12) = 0.763763 (Kozai 1962; Lidov 1962 [mem]).
  // J2 = 0.1, R = 500 m each lobe, e = 0.2: n = √(GM_in/a³) = 2.230856e-4 s⁻¹,
  // ϖ̇ = 1.5·n·0.1·(0.25)²/(0.96)² = 2.269344e-6 rad/s per lobe (Murray & Dermott 1999 ch. 6 [mem]).
  const m = 3e-18 * 1.3271244e20 / 6.67430e-11
  const input = {
    semiMajorAxis: 2000, eccentricity: 0.2, inclinationDeg: 60, heliocentricSemiMajorAxis: 2 * 149_597_870_700, heliocentricEccentricity: 0.1,
    massA: m / 2, massB: m / 2, J2A: 0.1, referenceRadiusA: 500, J2B: 0.1, referenceRadiusB: 500, contactSeparation: 900,
  }
  it('Hill radius, Kozai e_max, t_KL and the J2 rate at the worked values', () => {
    const s = pathwayScreen(input)
    expect(s.hillRadius / (2 * 149_597.8707)).toBeCloseTo(1, 9)
    expect(s.eMax).toBeCloseTo(0.763763, 6)
    expect(s.minimumPericentre).toBeCloseTo(2000 * (1 - 0.7637626), 3)
    expect(s.minimumPericentreReachesContact).toBe(true)
    expect(s.innerPeriod).toBeCloseTo(28164.91, 1)
    expect(s.kozaiTimescale / 4.730506e10).toBeCloseTo(1, 6)
    expect(s.j2PrecessionRateA).toBeCloseTo(2.269344e-6, 11)
    expect(s.quenchParameter).toBeCloseTo(2 * 2.269344e-6 * 4.730506e10, -1)
    expect(s.j2QuenchesKozai).toBe(true)
    // ϖ̇·t_KL ≈ 2.1×10⁵ ≫ 1: quenched (Liu, Muñoz & Lai 2015 [mem threshold]; Fang & Margot 2012).
    expect(s.verdict).toBe('quenched')
    expect(s.klPrefactor).toBeCloseTo(8 / (15 * Math.PI), 15)
  })
  it('outside the Kozai window (i = 30°) e_max stays at e0 ≈ 0', () => {
    const s = pathwayScreen({ ...input, inclinationDeg: 30 })
    expect(s.inKozaiWindow).toBe(false)
    expect(s.eMax).toBe(0)
    expect(s.minimumPericentreReachesContact).toBe(false)
    expect(s.verdict).toBe('outside-window')
  })
  it('an eccentric present orbit: the minimum pericentre is never farther than the present one a(1 − e) (definition of pericentre)', () => {
    // a = 2 km, e = 0.6: q = 800 m ≤ d = 900 m, outside the window (e_max 0 from a circular start)
    const s = pathwayScreen({ ...input, eccentricity: 0.6, inclinationDeg: 30 })
    expect(s.currentPericentre).toBeCloseTo(800, 9)
    expect(s.currentPericentreReachesContact).toBe(true)
    expect(s.minimumPericentre).toBeCloseTo(800, 9)
    expect(s.minimumPericentreReachesContact).toBe(true)
    expect(s.verdict).toBe('outside-window')
    expect(s.caveats).toMatch(/near-circular start/)
    // in the window with e_max = 0.7638 > e = 0.6 the cycles set it: a(1 − e_max)
    expect(pathwayScreen({ ...input, eccentricity: 0.6 }).minimumPericentre).toBeCloseTo(2000 * (1 - 0.7637626), 3)
    // the worked example's e = 0.2 pericentre, 1600 m, is outside contact
    expect(pathwayScreen(input).currentPericentreReachesContact).toBe(false)
  })
  it('without J2 (spherical lobes) nothing precesses: in the window the cycles are not quenched', () => {
    // ϖ̇ = (3/2) n J2 (R/a)² = 0 for J2 = 0 (Murray & Dermott 1999 ch. 6 [mem eq.]), so ϖ̇·t_KL = 0 < 1.
    const s = pathwayScreen({ ...input, J2A: 0, J2B: 0 })
    expect(s.quenchParameter).toBe(0)
    expect(s.verdict).toBe('not-quenched')
    // Window edges: cos² i = 3/5 at i = 39.23° (Kozai 1962; Lidov 1962 [mem]).
    expect(pathwayScreen({ ...input, J2A: 0, J2B: 0, inclinationDeg: 39 }).verdict).toBe('outside-window')
    expect(pathwayScreen({ ...input, J2A: 0, J2B: 0, inclinationDeg: 39.5 }).verdict).toBe('not-quenched')
  })
})
