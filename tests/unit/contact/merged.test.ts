import { describe, expect, it } from 'vitest'
import { breakupSpinPeriod, icosphere, massProperties, mergedBody, mergeMeshes, minimumDensityForPeriod, overlapAndUnion } from '#shared/geometry'
import type { MassModel, Mat3, MergedInput, TriMesh, Vec3 } from '#shared/geometry'

const G = 6.67430e-11

describe('merged body', () => {
  it('strengthless-sphere breakup period √(3π/(Gρ)) is 3.30 h at 1000 kg m⁻³', () => {
    // docs/contact-and-kinematics.md [derived]: √(3π/(6.6743e-11·1000)) = 11883 s = 3.3009 h.
    expect(breakupSpinPeriod(1000) / 3600).toBeCloseTo(3.3009, 4)
    // Inverse: the density whose breakup period is 3.3009 h is 1000 kg m⁻³.
    expect(3 * Math.PI / (G * breakupSpinPeriod(1000) ** 2)).toBeCloseTo(1000, 8)
  })

  it('two separated spheres: inertia by the parallel-axis theorem, spin from L, neck stress sign', () => {
    // Parallel-axis theorem (Steiner), sphere I = 2MR²/5 (textbook closed forms, docs/mass-properties.md):
    // about the joint centre of mass, I_yy = I_zz = Σ(2/5 m_i R_i² + m_i r_i²), I_xx = Σ 2/5 m_i R_i².
    const R1 = 1, R2 = 0.6, d = 2, rho = 2000
    const A = icosphere(4, R1)
    const pA = massProperties(A, { density: rho }), pB = massProperties(icosphere(4, R2), { density: rho })
    const L: Vec3 = [0, 0, 3e6]
    const m = mergedBody({
      overlap: null, propsA: pA, propsB: pB, poseB: { quaternion: [1, 0, 0, 0], translation: [d, 0, 0] }, massModel: 'keep-density',
      orbitalAngularMomentum: L, orbitalAngularRate: 0, orbitNormal: [0, 0, 1], direction: [1, 0, 0], separation: d, neckArea: 0.1, spinA: 'none', spinB: 'none',
    })
    const m1 = rho * 4 / 3 * Math.PI * R1 ** 3, m2 = rho * 4 / 3 * Math.PI * R2 ** 3
    const r1 = d * m2 / (m1 + m2), r2 = d * m1 / (m1 + m2)
    const Ixx = 0.4 * (m1 * R1 ** 2 + m2 * R2 ** 2)
    const Izz = Ixx + m1 * r1 ** 2 + m2 * r2 ** 2
    // Level-4 icospheres: volume and moments low by ~2e-3 and ~4e-3 (docs/mass-properties.md discretisation note).
    expect(Math.abs(m.inertia[0][0] / Ixx - 1)).toBeLessThan(6e-3)
    expect(Math.abs(m.inertia[2][2] / Izz - 1)).toBeLessThan(6e-3)
    expect(Math.abs(m.mass / (m1 + m2) - 1)).toBeLessThan(3e-3)
    // ω = I⁻¹L about z; relaxed period 2πC/|L|; L along the largest-moment axis → no tumble.
    expect(m.spinPeriod).toBeCloseTo(2 * Math.PI * m.inertia[2][2] / 3e6, 6)
    expect(m.relaxedSpinPeriod).toBeCloseTo(2 * Math.PI * m.principalMoments[2] / 3e6, 6)
    expect(m.tumbleAngleDeg).toBeLessThan(1e-6)
    // Point-mass separation period 2π√(d³/(GM)) (Kepler's third law, docs/contact-and-kinematics.md), with the d it reports.
    expect(m.separation).toBe(d)
    expect(m.separationSpinPeriod / (2 * Math.PI * Math.sqrt(d ** 3 / (G * (pA.mass + pB.mass))))).toBeCloseTo(1, 12)
    // Neck stress, docs/neck-and-merged-body.md: F_n = m_B(ω²r_B − G m_A/d²) over the area.
    expect(m.spinPeriod).not.toBeNull()
    const w = 2 * Math.PI / m.spinPeriod!
    const rB = d * pA.mass / (pA.mass + pB.mass)
    const sigma = pB.mass * (w * w * rB - G * pA.mass / d ** 2) / 0.1
    expect(m.neckStress! / sigma).toBeCloseTo(1, 10)
    expect(sigma).not.toBe(0)
    // Conserve-mass: the same total mass at a raised density.
    const c = mergedBody({
      overlap: null, propsA: pA, propsB: pB, poseB: { quaternion: [1, 0, 0, 0], translation: [d, 0, 0] }, massModel: 'conserve-mass',
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

  // ---- Two lobes of different densities: A at ρ_A plus B∖A at ρ_B (the overlap counted in A). ----
  //
  // Closed forms: a sphere of radius R centred at x = c on the x axis, cut to the slab c+a ≤ x ≤ c+b,
  // is a stack of thin discs of radius² R² − u² (u = x − c). A thin disc of mass m and radius r has
  // I_axis = m r²/2 and I_diameter = m r²/4 (textbook: Goldstein, Classical Mechanics, ch. 5 [mem: chapter]);
  // with the parallel-axis (Steiner) theorem the slab integrals are polynomials in u:
  //   m = πρ[R²u − u³/3], S = ∫u dm = πρ[R²u²/2 − u⁴/4],
  //   I_xx = (πρ/2)[R⁴u − 2R²u³/3 + u⁵/5],  ∫(u² + y²) dm = πρ[(R⁴u − 2R²u³/3 + u⁵/5)/4 + R²u³/3 − u⁵/5],
  // evaluated between a and b. Full sphere (a = −R, b = R): m = 4πρR³/3, I = 2mR²/5 (docs/mass-properties.md).
  // Sphere–sphere intersection plane x_i = (d² + R1² − R2²)/(2d) (Weisstein, MathWorld "Sphere-Sphere
  // Intersection"): B's points with x < x_i lie inside A, and A's points with x > x_i lie inside B, so
  // B∖A = (B ∩ {x > x_i}) − (A ∩ {x > x_i}).
  interface Moments { m: number, Sx: number, Ixx: number, Jyy: number }
  function slab(R: number, c: number, a: number, b: number, rho: number): Moments {
    const F = (u: number) => ({
      m: R * R * u - u ** 3 / 3,
      S: R * R * u * u / 2 - u ** 4 / 4,
      Ixx: (R ** 4 * u - 2 * R * R * u ** 3 / 3 + u ** 5 / 5) / 2,
      J: (R ** 4 * u - 2 * R * R * u ** 3 / 3 + u ** 5 / 5) / 4 + R * R * u ** 3 / 3 - u ** 5 / 5,
    })
    const hi = F(b), lo = F(a), k = Math.PI * rho
    const m = k * (hi.m - lo.m), S = k * (hi.S - lo.S), J = k * (hi.J - lo.J)
    // About the global origin: x = u + c; ∫(x² + y²) dm = J + 2cS + c²m.
    return { m, Sx: S + c * m, Ixx: k * (hi.Ixx - lo.Ixx), Jyy: J + 2 * c * S + c * c * m }
  }
  const sum = (parts: [Moments, number][]): Moments => parts.reduce((t, [p, w]) => ({ m: t.m + w * p.m, Sx: t.Sx + w * p.Sx, Ixx: t.Ixx + w * p.Ixx, Jyy: t.Jyy + w * p.Jyy }), { m: 0, Sx: 0, Ixx: 0, Jyy: 0 })
  /** Closed-form two-density body: mass, centroid x, I_xx and I_yy = I_zz about the centroid. */
  function closedForm(R1: number, R2: number, d: number, rhoA: number, rhoB: number) {
    const xi = d >= R1 + R2 ? R1 : (d * d + R1 * R1 - R2 * R2) / (2 * d)
    const t = sum([[slab(R1, 0, -R1, R1, rhoA), 1], [slab(R2, d, xi - d, R2, rhoB), 1], [slab(R1, 0, xi, R1, rhoB), -1]])
    const X = t.Sx / t.m
    return { mass: t.m, X, Ixx: t.Ixx, Iyy: t.Jyy - t.m * X * X }
  }

  // Level-5 icospheres (20 480 faces) are inscribed: volume ~5e-4 low, second moments ~1e-3 low
  // (docs/mass-properties.md discretisation note); the lens is cut from the same polyhedra (manifold-3d, float32).
  const SUB = 5, TOL_M = 1.5e-3, TOL_I = 2.5e-3
  const R1 = 1000, R2 = 600
  const A = icosphere(SUB, R1), Bm = icosphere(SUB, R2)
  const base = (d: number, overlap: TriMesh | null, rhoA: number, rhoB: number, massModel: MassModel): MergedInput => ({
    overlap, propsA: massProperties(A, { density: rhoA }), propsB: massProperties(Bm, { density: rhoB }), poseB: { quaternion: [1, 0, 0, 0], translation: [d, 0, 0] },
    massModel, orbitalAngularMomentum: [0, 0, 1e12], orbitalAngularRate: 0, orbitNormal: [0, 0, 1], direction: [1, 0, 0], separation: d, neckArea: 0, spinA: 'none', spinB: 'none',
  })
  const rel = (a: number, b: number) => Math.abs(a / b - 1)
  const expectDiag = (I: Mat3, cf: { Ixx: number, Iyy: number }, tol: number) => {
    expect(rel(I[0][0], cf.Ixx)).toBeLessThan(tol)
    expect(rel(I[1][1], cf.Iyy)).toBeLessThan(tol)
    expect(rel(I[2][2], cf.Iyy)).toBeLessThan(tol)
    // Axisymmetric about x: no products of inertia (round-off level against the largest moment).
    for (const [i, j] of [[0, 1], [0, 2], [1, 2]]) expect(Math.abs(I[i][j]) / cf.Iyy).toBeLessThan(1e-6)
  }

  it('touching spheres of densities 1000 and 3000 kg m⁻³: mass, mass-weighted centroid, Steiner inertia', () => {
    const rhoA = 1000, rhoB = 3000, d = R1 + R2
    const m = mergedBody(base(d, null, rhoA, rhoB, 'keep-density'))
    const cf = closedForm(R1, R2, d, rhoA, rhoB)
    // Touching: centroid x = d·m_B/(m_A + m_B) (mass-weighted mean, Goldstein, Classical Mechanics, ch. 1 [mem: chapter]).
    const mA = rhoA * 4 / 3 * Math.PI * R1 ** 3, mB = rhoB * 4 / 3 * Math.PI * R2 ** 3
    expect(cf.X).toBeCloseTo(d * mB / (mA + mB), 6)
    expect(rel(m.mass, cf.mass)).toBeLessThan(TOL_M)
    // Both icospheres lose the same volume fraction, so the centroid is far better than the masses.
    expect(Math.abs(m.centroid[0] - cf.X) / d).toBeLessThan(1e-6)
    expect(Math.abs(m.centroid[1]) + Math.abs(m.centroid[2])).toBeLessThan(1e-9 * d)
    expectDiag(m.inertia, cf, TOL_I)
    expect(m.massLost).toBe(0)
    expect(m.densityA).toBe(rhoA)
    expect(m.densityB).toBe(rhoB)
    // The uniform-density shortcut this replaces would put the centroid at d·V_B/(V_A + V_B):
    // make sure the test tells the two apart.
    expect(Math.abs(d * R2 ** 3 / (R1 ** 3 + R2 ** 3) - cf.X) / d).toBeGreaterThan(0.05)
    // J2 and C22 from the principal moments (MacCullagh, docs/harmonics.md) with R = volume-equivalent radius.
    const R = Math.cbrt(R1 ** 3 + R2 ** 3)
    expect(m.referenceRadius / R).toBeCloseTo(1, 3)
    // Prolate along x: A = I_xx, B = C = I_yy, so J2 = (C − A)/(2MR²) and C22 = (B − A)/(4MR²) = J2/2.
    expect(rel(m.J2, (cf.Iyy - cf.Ixx) / (2 * cf.mass * R * R))).toBeLessThan(5e-3)
    expect(rel(m.C22, (cf.Iyy - cf.Ixx) / (4 * cf.mass * R * R))).toBeLessThan(5e-3)
  })

  it('overlapping spheres of different densities: overlap counted in A; keep-density and conserve-mass', async () => {
    const rhoA = 1200, rhoB = 2600, d = 1400 // 200 m overlap
    const ov = await overlapAndUnion(A, Bm, { quaternion: [1, 0, 0, 0], translation: [d, 0, 0] }, [1, 0, 0], 0)
    const cf = closedForm(R1, R2, d, rhoA, rhoB)
    // Lens volume against MathWorld "Sphere-Sphere Intersection" (docs/neck-and-merged-body.md).
    const VL = Math.PI * (R1 + R2 - d) ** 2 * (d * d + 2 * d * R2 - 3 * R2 * R2 + 2 * d * R1 + 6 * R1 * R2 - 3 * R1 * R1) / (12 * d)
    const keep = mergedBody(base(d, ov.intersection, rhoA, rhoB, 'keep-density'))
    expect(rel(keep.overlapVolume, VL)).toBeLessThan(1e-2) // the lens is a thin cut of the polyhedra
    expect(rel(keep.mass, cf.mass)).toBeLessThan(TOL_M)
    expect(Math.abs(keep.centroid[0] - cf.X) / d).toBeLessThan(5e-4)
    expectDiag(keep.inertia, cf, TOL_I)
    // Mass lost = B's share of the lens, ρ_B V_lens (the lens belongs to A).
    expect(rel(keep.massLost, rhoB * VL)).toBeLessThan(1e-2)
    expect(rel(keep.volume, 4 / 3 * Math.PI * (R1 ** 3 + R2 ** 3) - VL)).toBeLessThan(TOL_M)
    // Conserve-mass: total mass kept, both densities raised by one factor, centroid unchanged, inertia × k.
    const cons = mergedBody(base(d, ov.intersection, rhoA, rhoB, 'conserve-mass'))
    const mLobes = massProperties(A, { density: rhoA }).mass + massProperties(Bm, { density: rhoB }).mass
    expect(rel(cons.mass, mLobes)).toBeLessThan(1e-12)
    const k = mLobes / keep.mass
    expect(cons.densityA / rhoA).toBeCloseTo(k, 12)
    expect(cons.densityB / rhoB).toBeCloseTo(k, 12)
    expect(cons.centroid[0]).toBeCloseTo(keep.centroid[0], 6)
    expectDiag(cons.inertia, { Ixx: cf.Ixx * (cf.mass + rhoB * VL) / cf.mass, Iyy: cf.Iyy * (cf.mass + rhoB * VL) / cf.mass }, TOL_I)
    expect(cons.massLost).toBe(0)
    expect(cons.caveats).toMatch(/overlap counted in A/)
  })

  it('equal densities: the same numbers as a homogeneous union mesh (signed tetrahedra, docs/mass-properties.md)', async () => {
    const rho = 1800
    // Touching: the two spheres as one two-component mesh.
    const d0 = R1 + R2
    const touch = mergedBody(base(d0, null, rho, rho, 'keep-density'))
    const u0 = massProperties(mergeMeshes([A, icosphere(SUB, R2, [d0, 0, 0])]), { density: rho })
    expect(rel(touch.mass, u0.mass)).toBeLessThan(1e-12)
    for (let i = 0; i < 3; i++) expect(Math.abs(touch.centroid[i] - u0.centroid[i])).toBeLessThan(1e-9 * d0)
    for (let i = 0; i < 3; i++) expect(rel(touch.inertia[i][i], u0.inertia[i][i])).toBeLessThan(1e-9)
    // Overlapping: the manifold union at ρ (keep-density) and at M/V_union (conserve-mass).
    const d = 1400
    const ov = await overlapAndUnion(A, Bm, { quaternion: [1, 0, 0, 0], translation: [d, 0, 0] }, [1, 0, 0], 0)
    const keep = mergedBody(base(d, ov.intersection, rho, rho, 'keep-density'))
    const cons = mergedBody(base(d, ov.intersection, rho, rho, 'conserve-mass'))
    const uk = massProperties(ov.union, { density: rho })
    const uc = massProperties(ov.union, { density: (massProperties(A, { density: rho }).mass + massProperties(Bm, { density: rho }).mass) / uk.volume })
    // manifold-3d keeps float32 vertices: agreement to ~1e-6.
    for (const [m, u] of [[keep, uk], [cons, uc]] as const) {
      expect(rel(m.mass, u.mass)).toBeLessThan(1e-5)
      expect(rel(m.volume, u.volume)).toBeLessThan(1e-5)
      expect(Math.abs(m.centroid[0] - u.centroid[0]) / d).toBeLessThan(1e-5)
      for (let i = 0; i < 3; i++) expect(rel(m.inertia[i][i], u.inertia[i][i])).toBeLessThan(1e-5)
      expect(rel(m.J2, u.J2)).toBeLessThan(1e-4)
      expect(rel(m.density, u.density)).toBeLessThan(1e-5)
    }
    expect(keep.caveats).toMatch(/^Homogeneous body/)
  })
})
