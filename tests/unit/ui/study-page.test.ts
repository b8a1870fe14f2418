import { describe, expect, it } from 'vitest'
import { icosphere, massProperties, mergedBody, runContactStudy } from '#shared/geometry'
import { studyInputSchema } from '#shared/types/studies'
import { neckTensionCaution, studyInputRows, studySpreadNote } from '../../../utils/studies'

const G = 6.67430e-11 // CODATA 2018

/** Dotted paths of every leaf of a plain object (arrays and priors are leaves). */
function leafPaths(o: Record<string, unknown>, prefix = ''): string[] {
  return Object.entries(o).flatMap(([k, v]) => {
    const path = prefix ? `${prefix}.${k}` : k
    const isPrior = !!v && typeof v === 'object' && 'kind' in v && prefix === 'spread'
    return v && typeof v === 'object' && !Array.isArray(v) && !isPrior ? leafPaths(v as Record<string, unknown>, path) : [path]
  })
}

describe('study page: the inputs table', () => {
  // Every field a study can be given, as the server stores it (densities filled in).
  const full = {
    ...studyInputSchema.parse({
      title: 'every input',
      lobeA: 1, lobeB: 2, densityA: 500, densityB: 650, massModel: 'keep-density',
      orientationB: [0, 0, 0, 1], direction: [0, 2, 0], orbitNormal: [0, 0, 1],
      orbit: { kind: 'bound', semiMajorAxis: 30_000, eccentricity: 0.5 },
      spinA: 'synchronous', spinB: [0, 0, 1e-4], overlapDepth: 600, sweepSteps: 3, observedSpinPeriodHours: 12.5,
      screen: { inclinationDeg: 20, heliocentricSemiMajorAxisAu: 44.3, heliocentricEccentricity: 0.037, klPrefactor: 0.2 },
      spread: { seed: 9, samples: 32, densityA: { kind: 'uniform', min: 300, max: 800 }, densityB: { kind: 'normal', mean: 650, std: 50 }, coneHalfAngleDeg: 15, scale: { kind: 'fixed', value: 1 }, neck: false },
    }),
  }
  const rows = studyInputRows(full as never, { a: 'large', b: 'small' })
  const row = (key: string) => rows.find(r => r.keys?.includes(key))!

  it('has a row for every input field except the title (a new field without a row fails here)', () => {
    const covered = new Set(rows.flatMap(r => r.keys ?? []))
    const missing = leafPaths(full as Record<string, unknown>).filter(p => p !== 'title' && !covered.has(p))
    expect(missing).toEqual([])
  })

  it('gives each number its unit: lengths in m with km beside them, densities in kg m⁻³, angles in degrees', () => {
    expect(row('orbit.semiMajorAxis')).toMatchObject({ value: '30000 (= 30 km)', unit: 'm' })
    expect(row('orbit.eccentricity')).toMatchObject({ value: '0.5', unit: '—' })
    // The pericentre a(1 − e) follows from a and e (15 km here).
    expect(rows.find(r => r.label.startsWith('Pericentre a(1 − e)'))).toMatchObject({ value: '15000 (= 15 km)', unit: 'm' })
    expect(row('overlapDepth')).toMatchObject({ value: '600 (= 0.6 km)', unit: 'm' })
    expect(row('densityA')).toMatchObject({ value: '500', unit: 'kg m⁻³' })
    expect(row('densityB')).toMatchObject({ value: '650', unit: 'kg m⁻³' })
    expect(row('spinB')).toMatchObject({ value: '(0, 0, 1×10⁻⁴)', unit: 'rad s⁻¹' })
    expect(row('spinA').value).toMatch(/synchronous/)
    expect(row('observedSpinPeriodHours')).toMatchObject({ value: '12.5', unit: 'h' })
    expect(row('screen.inclinationDeg')).toMatchObject({ value: '20', unit: '°' })
    // 44.3 au × 149 597 870 700 m (IAU 2012 B2) = 6.6272e12 m.
    expect(row('screen.heliocentricSemiMajorAxisAu')).toMatchObject({ value: '44.3 (= 6.6272×10¹² m)', unit: 'au' })
    expect(row('screen.heliocentricEccentricity')).toMatchObject({ value: '0.037', unit: '—' })
    expect(row('spread.densityA')).toMatchObject({ value: 'uniform 300 – 800', unit: 'kg m⁻³' })
    expect(row('spread.densityB')).toMatchObject({ value: 'normal, mean 650, σ 50', unit: 'kg m⁻³' })
    expect(row('spread.coneHalfAngleDeg')).toMatchObject({ value: '15', unit: '°' })
    expect(row('orientationB').value).toBe('(0, 0, 0, 1)')
    // The direction is stored normalised.
    expect(row('direction').value).toBe('(0, 1, 0)')
    expect(row('lobeA').value).toBe('large (#1)')
  })

  it('says what was left at its default or not asked for', () => {
    const minimal = { ...studyInputSchema.parse({ lobeA: 1, lobeB: 2, direction: [1, 0, 0], orbit: { kind: 'hyperbolic', vInfinity: 2, pericentre: 250 } }), densityA: 1000, densityB: 1000 }
    const r = studyInputRows(minimal as never)
    const get = (key: string) => r.find(x => x.keys?.includes(key))!
    expect(get('orbitNormal').value).toMatch(/default: A’s largest-moment axis/)
    expect(get('orbit.pericentre')).toMatchObject({ value: '250 (= 0.25 km)', unit: 'm' })
    expect(get('orbit.vInfinity')).toMatchObject({ value: '2', unit: 'm s⁻¹' })
    expect(get('screen').value).toBe('not asked for')
    expect(get('spread').value).toBe('not asked for')
    expect(get('observedSpinPeriodHours').value).toBe('not given')
  })
})

describe('study page: a caution beside a spread that does not cover the nominal value', () => {
  const meshA = icosphere(2, 1000), meshB = icosphere(2, 700)
  const base = { meshA, meshB, densityA: 1000, densityB: 1000, direction: [1, 0, 0] as [number, number, number], orbit: { kind: 'parabolic' as const, pericentre: 0 }, massModel: 'conserve-mass' as const, sweepSteps: 0 }

  it('a spread over 2000–3000 kg m⁻³ around a 1000 kg m⁻³ run lies wholly above the nominal contact speed, and says so', async () => {
    const r = await runContactStudy({ ...base, spread: { seed: 4, samples: 6, densityA: { kind: 'uniform', min: 2000, max: 3000 }, densityB: { kind: 'uniform', min: 2000, max: 3000 }, coneHalfAngleDeg: 0, scale: { kind: 'fixed', value: 1 }, neck: false } })
    if (!('speed' in r.contact)) throw new Error('expected contact')
    // Head-on parabolic: v = √(2GM/d) ∝ √ρ at fixed geometry (vis-viva, docs/contact-and-kinematics.md), so every sample is
    // at least √2 × the nominal speed.
    expect(r.spread!.speed!.min / r.contact.speed).toBeGreaterThan(Math.SQRT2 - 1e-9)
    const note = studySpreadNote(r, 'speed')
    expect(note).toMatch(/^The spread is not centred on the nominal value/)
    expect(note).toContain(`The nominal value ${Number(r.contact.speed.toPrecision(5))} m s⁻¹ lies outside the spread's range`)
    expect(note).toContain('(below every sample)')
    expect(studySpreadNote(r, 'escapeSpeed')).toContain('(below every sample)')
    // Head-on with non-spinning lobes: no spin in any sample, so no spin spread and no note.
    expect(studySpreadNote(r, 'spinPeriod')).toBe('')
  })

  it('a spread of fixed inputs equal to the nominal run (no cone) covers it: no note', async () => {
    const r = await runContactStudy({ ...base, spread: { seed: 4, samples: 3, densityA: { kind: 'fixed', value: 1000 }, densityB: { kind: 'fixed', value: 1000 }, coneHalfAngleDeg: 0, scale: { kind: 'fixed', value: 1 }, neck: false } })
    expect(r.spread!.speed!.std).toBeLessThan(1e-12 * r.spread!.speed!.median)
    expect(studySpreadNote(r, 'speed')).toBe('')
    expect(studySpreadNote(r, 'escapeSpeed')).toBe('')
  })
})

describe('study page: neck in tension', () => {
  // Two touching spheres as the merged body's parts, spinning about z (a principal axis) with ω a
  // chosen multiple of the Keplerian rate at contact √(GM/d³): the lobes separate when ω² > GM/d³
  // (docs/contact-and-kinematics.md), so the mean neck stress F_n = m_B(ω²r_B − Gm_A/d²) (docs/neck-and-merged-body.md) changes sign there.
  const R1 = 1000, R2 = 700, d = R1 + R2, rho = 1000
  const pA = massProperties(icosphere(3, R1), { density: rho }), pB = massProperties(icosphere(3, R2), { density: rho })
  const merged = (Lz: number) => mergedBody({
    overlap: null, propsA: pA, propsB: pB, poseB: { quaternion: [1, 0, 0, 0], translation: [d, 0, 0] }, massModel: 'keep-density',
    orbitalAngularMomentum: [0, 0, Lz], orbitalAngularRate: 0, orbitNormal: [0, 0, 1], direction: [1, 0, 0], separation: d, neckArea: 1e5, spinA: 'none', spinB: 'none',
  })
  const Izz = merged(1).inertia[2][2]
  const omegaK = Math.sqrt(G * (pA.mass + pB.mass) / d ** 3)

  it('spin 10 % above the separation rate: tension, and a caution with the stress in Pa and the model', () => {
    const m = merged(1.1 * omegaK * Izz)
    expect(m.spinPeriod!).toBeLessThan(m.separationSpinPeriod)
    expect(m.neckStress!).toBeGreaterThan(0)
    // σ̄ = m_B(ω²r_B − Gm_A/d²)/A with ω = 1.1 ω_K, r_B = d m_A/M (docs/neck-and-merged-body.md).
    const rB = d * pA.mass / (pA.mass + pB.mass)
    expect(m.neckStress! / (pB.mass * ((1.1 * omegaK) ** 2 * rB - G * pA.mass / d ** 2) / 1e5)).toBeCloseTo(1, 6)
    const text = neckTensionCaution(m)!
    expect(text).toMatch(/^Neck in tension: the mean neck stress is \+/)
    expect(text).toContain(`${Number(m.neckStress!.toPrecision(5))} Pa`)
    expect(text).toContain('shorter than the lobe-separation period')
    expect(text).toContain('the lobes would separate at this spin')
    expect(text).toContain('point masses at their centroids')
    expect(text).toContain('strengthless-sphere breakup period')
  })

  it('spin 10 % below the separation rate: compression, no caution', () => {
    const m = merged(0.9 * omegaK * Izz)
    expect(m.neckStress!).toBeLessThan(0)
    expect(neckTensionCaution(m)).toBeNull()
  })

  it('point contact (no neck area) spinning faster than the lobes separate: a caution without a stress figure', () => {
    const m = { ...merged(1.1 * omegaK * Izz), neckStress: null }
    const text = neckTensionCaution(m)!
    expect(text).toContain('touch at a point')
    expect(text).not.toContain(' Pa')
    expect(neckTensionCaution({ ...m, spinPeriod: null })).toBeNull()
  })
})
