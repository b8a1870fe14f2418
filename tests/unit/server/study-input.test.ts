import { describe, expect, it } from 'vitest'
import { defaultSpreadDensityRange, studyInputSchema } from '#shared/types/studies'
import { createRng } from '#shared/geometry'

// The pathway screen (Kozai–Lidov timescale, J2 precession, Hill radius: docs/pathway-screen.md) is defined
// for a bound mutual orbit only: a screen asked for with any other orbit is refused, not ignored.
describe('study input: pathway screen needs a bound orbit', () => {
  const base = { lobeA: 1, lobeB: 2, direction: [1, 0, 0], screen: { inclinationDeg: 60, heliocentricSemiMajorAxisAu: 2.5 } }
  for (const orbit of [{ kind: 'parabolic' }, { kind: 'hyperbolic', vInfinity: 0.5 }]) {
    it(`refuses a screen with a ${orbit.kind} orbit, naming the field`, () => {
      const r = studyInputSchema.safeParse({ ...base, orbit })
      expect(r.success).toBe(false)
      const issue = r.error!.issues.find(i => i.path.join('.') === 'screen')
      expect(issue?.message).toMatch(/bound orbit/)
    })
  }
  it('accepts a screen with a bound orbit, and other orbits without one', () => {
    expect(studyInputSchema.safeParse({ ...base, orbit: { kind: 'bound', semiMajorAxis: 5000, eccentricity: 0.2 } }).success).toBe(true)
    expect(studyInputSchema.safeParse({ ...base, screen: undefined, orbit: { kind: 'parabolic' } }).success).toBe(true)
  })
})

// A lobe cannot meet itself: the first contact of a mesh with its own copy in the same place is undefined.
describe('study input: lobe A and lobe B must differ', () => {
  const base = { direction: [1, 0, 0], orbit: { kind: 'parabolic' } }
  it('refuses a lobe against itself, naming lobeB', () => {
    const r = studyInputSchema.safeParse({ ...base, lobeA: 3, lobeB: 3 })
    expect(r.success).toBe(false)
    const issue = r.error!.issues.find(i => i.path.join('.') === 'lobeB')
    expect(issue?.message).toMatch(/different lobe from lobe A/)
  })
  it('accepts two different lobes', () => {
    expect(studyInputSchema.safeParse({ ...base, lobeA: 3, lobeB: 4 }).success).toBe(true)
  })
})

describe('default spread density range: a band around the lobes\' densities', () => {
  it('follows the lobes: 0.6 × the lower to 1.4 × the higher, rounded outward to 10 kg m⁻³', () => {
    // Both lobes at 1500 kg m⁻³: 900–2100 (a fixed 300–1200 would exclude the nominal run).
    expect(defaultSpreadDensityRange(1500, 1500)).toEqual({ min: 900, max: 2100 })
    expect(defaultSpreadDensityRange(500, 500)).toEqual({ min: 300, max: 700 })
    expect(defaultSpreadDensityRange(800, 800)).toEqual({ min: 480, max: 1120 })
    // Order of the lobes does not matter; 0.6 × 1234 = 740.4 → 740, 1.4 × 2345 = 3283 → 3290 (outward).
    expect(defaultSpreadDensityRange(2345, 1234)).toEqual({ min: 740, max: 3290 })
    // Below 100 kg m⁻³ the step is finer: 0.6 × 30 = 18, 1.4 × 45 = 63.
    expect(defaultSpreadDensityRange(30, 45)).toEqual({ min: 18, max: 63 })
    expect(defaultSpreadDensityRange(0, 500)).toBeNull()
    expect(defaultSpreadDensityRange(Number.NaN, 500)).toBeNull()
  })
  it('always contains both nominal densities, within 10 kg m⁻³ outside the 0.6 / 1.4 band (seeded random pairs, 1–10⁴ kg m⁻³)', () => {
    const rng = createRng(17, 0)
    for (let i = 0; i < 500; i++) {
      const a = 10 ** (4 * rng.next()), b = 10 ** (4 * rng.next())
      const lo = Math.min(a, b), hi = Math.max(a, b)
      const r = defaultSpreadDensityRange(a, b)!
      expect(r.min).toBeLessThanOrEqual(0.6 * lo)
      expect(r.max).toBeGreaterThanOrEqual(1.4 * hi)
      expect(r.min).toBeGreaterThan(0.6 * lo - 10)
      expect(r.max).toBeLessThan(1.4 * hi + 10)
      expect(r.min).toBeGreaterThan(0)
      // The range passes the schema's uniform prior (max ≥ min > 0).
      expect(studyInputSchema.safeParse({ lobeA: 1, lobeB: 2, direction: [1, 0, 0], orbit: { kind: 'parabolic' }, spread: { seed: 1, samples: 2, densityA: { kind: 'uniform', ...r }, densityB: { kind: 'uniform', ...r }, coneHalfAngleDeg: 0, scale: { kind: 'fixed', value: 1 } } }).success).toBe(true)
    }
  })
})
