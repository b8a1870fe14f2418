import { describe, expect, it } from 'vitest'
import { boxMesh, icosphere, massProperties } from '#shared/geometry'
import { COEFFICIENT_ROUND_OFF, MOMENT_DEGENERACY_REL, SLOPE_ROUND_OFF_DEG, bodyCount, coefficientCell, momentDegeneracy, slopeCell } from '../../../utils/lobe-display'

describe('principal axes left undefined by equal moments', () => {
  it('an icosphere: all three moments agree, no axis is defined', () => {
    // A symmetric tensor invariant under the icosahedral rotations is a multiple of the identity
    // (Schur's lemma for an irreducible 3-d representation; common practice, no source).
    const p = massProperties(icosphere(3, 1000), { density: 1000 })
    const d = momentDegeneracy(p.principalMoments)
    expect(d.equal).toBe('ABC')
    expect(d.defined).toEqual([false, false, false])
    expect(d.note).toMatch(/no principal axes are defined/)
    expect(d.note).toContain('10⁻⁹')
  })
  it('a 2 × 1 × 1 box: B = C by its square section, only the A axis (along the long side) is defined', () => {
    // Box moments M(b² + c²)/12 etc. (textbook closed form): b = c gives B = C.
    const p = massProperties(boxMesh(2, 1, 1), { density: 1000 })
    const d = momentDegeneracy(p.principalMoments)
    expect(d.equal).toBe('BC')
    expect(d.defined).toEqual([true, false, false])
    expect(d.note).toMatch(/B and C agree/)
  })
  it('a 2 × 1 × 0.5 box: three different moments, every axis defined, no note', () => {
    const d = momentDegeneracy(massProperties(boxMesh(2, 1, 0.5), { density: 1000 }).principalMoments)
    expect(d).toEqual({ defined: [true, true, true], equal: null, note: null })
  })
  it('the tolerance is relative to the largest moment: 0.5e-9 apart is equal, 2e-9 apart is not', () => {
    expect(momentDegeneracy([1, 1 + 0.5 * MOMENT_DEGENERACY_REL, 2]).equal).toBe('AB')
    expect(momentDegeneracy([1, 1 + 2 * 2 * MOMENT_DEGENERACY_REL, 2]).equal).toBeNull()
    expect(momentDegeneracy(undefined).equal).toBeNull()
  })
})

describe('round-off shown as 0, with the computed value on hover', () => {
  it('an icosphere’s J2 and C22 are round-off: "0 (round-off)", the raw value in the title', () => {
    const p = massProperties(icosphere(3, 1000), { density: 1000 })
    // 0 by symmetry (see above), so whatever float64 leaves is below the threshold
    expect(Math.abs(p.J2)).toBeLessThan(COEFFICIENT_ROUND_OFF)
    const c = coefficientCell(3.7e-16)
    expect(c.text).toBe('0 (round-off)')
    expect(c.title).toContain('3.7×10⁻¹⁶')
    expect(coefficientCell(p.C22).text).toMatch(/^0/)
  })
  it('a real J2 is shown as computed; so is an exact 0 (no round-off label)', () => {
    // Box 2 × 1 × 0.5: J2 = (C − (A + B)/2)/(M R²) with the box moments, R the volume-equivalent radius.
    const p = massProperties(boxMesh(2, 1, 0.5), { density: 1000 })
    const [A, B, C] = [(1 + 0.25) / 12, (4 + 0.25) / 12, (4 + 1) / 12]
    const R = Math.cbrt(3 / (4 * Math.PI))
    const J2 = (C - (A + B) / 2) / (R * R)
    expect(p.J2 / J2).toBeCloseTo(1, 10)
    expect(coefficientCell(p.J2).text).toBe(Number(J2.toPrecision(5)).toString())
    expect(coefficientCell(p.J2).title).toBeUndefined()
    expect(coefficientCell(0)).toEqual({ text: '0' })
    expect(coefficientCell(2e-12).text).toBe('2×10⁻¹²')
  })
  it('slopes: the smallest non-zero arccosine of a float64 cosine is below the threshold, a real 0.01° is not', () => {
    const oneUlp = Math.acos(1 - 2 ** -53) * 180 / Math.PI
    expect(oneUlp).toBeGreaterThan(0)
    expect(oneUlp).toBeLessThan(SLOPE_ROUND_OFF_DEG)
    const c = slopeCell({ min: 0, max: oneUlp, mean: 1.07e-7 })
    expect(c.text).toBe('0 (0 – 0) (round-off)')
    expect(c.title).toContain('1.07×10⁻⁷')
    expect(slopeCell({ min: 0.01, max: 30, mean: 12 })).toEqual({ text: '12 (0.01 – 30)' })
  })
})

describe('body count of a lobe', () => {
  it('is 1 without the multiple-components warning, else the report’s count', () => {
    expect(bodyCount({ warnings: [], report: { components: 1 } })).toBe(1)
    const w = [{ code: 'multiple-components', message: 'the mesh has 3 separate components (faces per component: 20, 20, 8)' }]
    expect(bodyCount({ warnings: w, report: { components: 3 } })).toBe(3)
    expect(bodyCount({ warnings: w, properties: { components: [{}, {}] } })).toBe(2)
    expect(bodyCount({ warnings: w })).toBe(3)
  })
})
