import { describe, expect, it } from 'vitest'
import { createRng, createSpreadContext, icosphere, massProperties, perturbedEllipsoid, quatFromAxisAngle, runContactStudy, runSpreadSample, sampleCone, summariseSpread } from '#shared/geometry'
import type { SpreadSpec } from '#shared/geometry'

const G = 6.67430e-11

describe('runContactStudy', () => {
  it('two spheres head-on from a parabolic orbit: speeds, full-shape figures, progress, field names', async () => {
    const R1 = 1000, R2 = 600
    const stages: string[] = []
    const r = await runContactStudy({
      meshA: icosphere(3, R1), meshB: icosphere(3, R2), densityA: 1000, densityB: 1000, direction: [1, 0, 0],
      orbit: { kind: 'parabolic' }, orbitNormal: [0, 0, 1], overlapDepth: 60, massModel: 'conserve-mass', sweepSteps: 2, mutual: { maxFaces: 1280 },
      screen: { semiMajorAxis: 5000, eccentricity: 0.1, inclinationDeg: 70, heliocentricSemiMajorAxis: 3 * 149_597_870_700 },
    }, { onProgress: (_f, s) => stages.push(s) })
    if (!('speedFullShape' in r.contact)) throw new Error('expected contact')
    const c = r.contact
    // Vis-viva at d = R1 + R2 − sagitta (parabolic: v = v_esc = √(2GM/d), docs/contact-and-kinematics.md).
    const M = 1000 * (4 / 3) * Math.PI * (R1 ** 3 + R2 ** 3)
    expect(c.speed / Math.sqrt(2 * G * M / c.separation)).toBeCloseTo(1, 2) // mesh masses ~1e-2 below the sphere's
    expect(c.speed).toBeCloseTo(c.escapeSpeed, 12)
    // Two spheres: W = G m_A m_B/d (Newton's shell theorem, Principia I, Prop. 71; B's mean-value
    // property for A's harmonic exterior potential). Tolerance from the mesh resolution: each level-3
    // icosphere keeps icosahedral symmetry (not simplified: maxFaces 1280), so its exterior potential
    // departs from a point mass first at degree 6 (common practice, no source), by about its
    // relative volume deficit ε times (R/d)⁶ [derived estimate]; plus the quadrature target 1e-4.
    const pA = massProperties(icosphere(3, R1), { density: 1000 }), pB = massProperties(icosphere(3, R2), { density: 1000 })
    const eps = (R: number, V: number) => 1 - V / (4 / 3 * Math.PI * R ** 3)
    const tolW = eps(R1, pA.volume) * (R1 / c.separation) ** 6 + eps(R2, pB.volume) * (R2 / c.separation) ** 6 + 2e-4
    expect(tolW).toBeLessThan(1e-3)
    const mp = c.mutualPotential
    expect(mp.converged).toBe(true)
    expect(mp.convergence!).toBeLessThan(1e-4)
    expect(mp.order).toBeGreaterThanOrEqual(3)
    expect(mp.simplified).toBe(false)
    expect([mp.facesA, mp.sourceFacesA]).toEqual([1280, 1280])
    expect(Math.abs(mp.W / (G * pA.mass * pB.mass / c.separation) - 1)).toBeLessThan(tolW)
    expect(Math.abs(c.escapeSpeedFullShape / c.escapeSpeed - 1)).toBeLessThan(tolW)
    expect(r.neck!.equivalentRadius).toBeGreaterThan(0)
    expect(r.merged!.massModel).toBe('conserve-mass')
    // The separation period uses the centroid separation after the 60 m settling move, and says so:
    // P = 2π√(d³/(GM)) with that d (Kepler's third law, docs/contact-and-kinematics.md).
    expect(r.merged!.separation).toBeCloseTo(c.separation - 60, 9)
    expect(r.merged!.separationSpinPeriod / (2 * Math.PI * Math.sqrt(r.merged!.separation ** 3 / (G * (pA.mass + pB.mass))))).toBeCloseTo(1, 9)
    expect(r.sweep).toHaveLength(3)
    // The sweep uses planes perpendicular to the line of centres and says so on each row.
    for (const row of r.sweep!) expect(row.tiltDeg).toBe(0)
    expect(r.screen!.kind).toBe('screen')
    expect(stages[0]).toBe('mass properties')
    expect(stages.at(-1)).toBe('done')
    for (const k of ['separation', 'point', 'normalA', 'normalB', 'poseB', 'speed', 'escapeSpeed', 'sphereEquivalentEscapeSpeed', 'speedRatio', 'radialSpeed', 'tangentialSpeed', 'normalSpeed', 'impactAngleFromNormalDeg', 'impactAngleFromTangentDeg', 'orbitalAngularMomentum', 'massRatio', 'speedFullShape', 'escapeSpeedFullShape'])
      expect(c).toHaveProperty(k)
    for (const k of ['massModel', 'volume', 'mass', 'centroid', 'principalMoments', 'principalAxes', 'J2', 'C22', 'referenceRadius', 'spinPeriod', 'spinAxis', 'relaxedSpinPeriod', 'tumbleAngleDeg', 'breakupSpinPeriod', 'separation', 'separationSpinPeriod', 'neckStress'])
      expect(r.merged).toHaveProperty(k)
  }, 60_000)

  it('stops with aborted when the signal fires', async () => {
    const ac = new AbortController()
    const p = runContactStudy({ meshA: icosphere(2, 1), meshB: icosphere(2, 1), densityA: 1000, densityB: 1000, direction: [1, 0, 0], orbit: { kind: 'parabolic' }, massModel: 'keep-density' },
      { onProgress: (_f, s) => { if (s === 'kinematics') ac.abort() }, signal: ac.signal })
    await expect(p).rejects.toMatchObject({ code: 'aborted' })
  })

  it('no-contact result when the pericentre lies beyond d', async () => {
    const r = await runContactStudy({ meshA: icosphere(2, 1), meshB: icosphere(2, 1), densityA: 1000, densityB: 1000, direction: [1, 0, 0], orbit: { kind: 'bound', semiMajorAxis: 10, eccentricity: 0.1 }, massModel: 'keep-density' })
    expect(r.contact).toMatchObject({ contact: false })
    expect(r.neck).toBeNull()
  })
})

describe('spread', () => {
  const meshA = perturbedEllipsoid(1200, 900, 800, 2, 1, 0.1), meshB = perturbedEllipsoid(700, 600, 500, 2, 2, 0.1)
  const mk = (spec: SpreadSpec) => createSpreadContext({ meshA, meshB, orientationB: quatFromAxisAngle([0, 1, 0], 0.4), direction: [1, 0.1, 0], orbit: { kind: 'bound', semiMajorAxis: 5000, eccentricity: 0.8 }, orbitNormal: [0, 0, 1], overlapDepth: 0, massModel: 'conserve-mass', spec })
  it('density scaling laws: v ∝ √ρ, P ∝ ρ^−½, J2 independent of ρ (homogeneous bodies, common practice, no source)', async () => {
    const fixed = (rho: number): SpreadSpec => ({ seed: 1, samples: 1, densityA: { kind: 'fixed', value: rho }, densityB: { kind: 'fixed', value: rho }, coneHalfAngleDeg: 0, scale: { kind: 'fixed', value: 1 } })
    const a = await runSpreadSample(mk(fixed(1000)), 0)
    const b = await runSpreadSample(mk(fixed(4000)), 0)
    expect(b.speed! / a.speed!).toBeCloseTo(2, 10)
    expect(b.escapeSpeed! / a.escapeSpeed!).toBeCloseTo(2, 10)
    expect(b.spinPeriod! / a.spinPeriod!).toBeCloseTo(0.5, 10)
    expect(b.mergedJ2! / a.mergedJ2!).toBeCloseTo(1, 10)
  })
  it('is reproducible per sample index and summarises', async () => {
    const spec: SpreadSpec = { seed: 42, samples: 4, densityA: { kind: 'normal', mean: 1500, std: 300 }, densityB: { kind: 'uniform', min: 800, max: 2000 }, coneHalfAngleDeg: 20, scale: { kind: 'uniform', min: 0.9, max: 1.1 } }
    const ctx = mk(spec)
    const s = [] as Awaited<ReturnType<typeof runSpreadSample>>[]
    for (let i = 0; i < 4; i++) s.push(await runSpreadSample(ctx, i))
    const again = await runSpreadSample(mk(spec), 2)
    expect(again).toEqual(s[2])
    const sum = summariseSpread(spec, s)
    expect(sum.speed!.n).toBe(4)
    expect(sum.speed!.min).toBeLessThanOrEqual(sum.speed!.median)
    expect(sum.speed!.median).toBeLessThanOrEqual(sum.speed!.max)
  })
  it('cone sampling is uniform in solid angle: mean cos θ = (1 + cos α)/2', () => {
    // Uniform on a spherical cap: cos θ is uniform on [cos α, 1] (Archimedes' hat-box theorem).
    const rng = createRng(7)
    let sum = 0
    const n = 20000
    for (let i = 0; i < n; i++) sum += sampleCone([0, 0, 1], 30, rng)[2]
    expect(sum / n).toBeCloseTo((1 + Math.cos(Math.PI / 6)) / 2, 2)
  })
})
