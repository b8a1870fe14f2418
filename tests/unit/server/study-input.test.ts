import { describe, expect, it } from 'vitest'
import { studyInputSchema } from '../../../shared/types/studies'

// The pathway screen (Kozai–Lidov timescale, J2 precession, Hill radius: SCIENCE.md §7) is defined
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
