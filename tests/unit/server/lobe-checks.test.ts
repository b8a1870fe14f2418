import { describe, expect, it } from 'vitest'
import { icosphere, massProperties } from '#shared/geometry'
import { SIZE_CHECK_MAX_RADIUS_M, SIZE_CHECK_MIN_RADIUS_M, lengthText, sameFileWarning, sizeCheckWarning } from '#shared/utils/lobe-checks'

describe('size check: a size no target body has points at the coordinate units', () => {
  it('warns for a 600 km-radius sphere read in km, asking about metres, with the size and the thresholds', () => {
    // A file in metres read as kilometres is 1000× too large (the definition of the units; common
    // practice, no source): a 600 m sphere becomes 1 200 km across.
    const r = massProperties(icosphere(4, 600_000), { density: 1000 }).equivalentRadius
    const w = sizeCheckWarning(r, 'km')!
    expect(w.code).toBe('size-check')
    expect(w.message).toContain('the body is 1 200 km across')
    expect(w.message).toContain('were the coordinates in metres?')
    expect(w.message).toContain('from 1 m to 300 km')
  })
  it('warns for a sub-metre body read in metres, asking about kilometres', () => {
    const w = sizeCheckWarning(0.3, 'm')!
    expect(w.message).toContain('60 cm across')
    expect(w.message).toContain('were the coordinates in kilometres?')
  })
  it('other readings: too large in metres asks about mm/cm, too small in km about a unit-size model', () => {
    expect(sizeCheckWarning(4e5, 'm')!.message).toMatch(/millimetres or centimetres/)
    expect(sizeCheckWarning(0.5, 'km')!.message).toMatch(/unit size/)
  })
  it('is quiet inside the range, just past its ends too, and for no size at all', () => {
    for (const r of [SIZE_CHECK_MIN_RADIUS_M, 1.001, 250, 5_000, 299_999, SIZE_CHECK_MAX_RADIUS_M]) expect(sizeCheckWarning(r, 'km'), String(r)).toBeNull()
    expect(sizeCheckWarning(0.999, 'm')).not.toBeNull()
    expect(sizeCheckWarning(300_001, 'km')).not.toBeNull()
    expect(sizeCheckWarning(Number.NaN, 'km')).toBeNull()
    expect(sizeCheckWarning(0, 'km')).toBeNull()
  })
  it('writes lengths with 3 significant digits and groups of three', () => {
    expect(lengthText(1_199_760)).toBe('1 200 km')
    expect(lengthText(12_345_678)).toBe('12 300 km')
    expect(lengthText(350)).toBe('350 m')
    expect(lengthText(0.042)).toBe('4.2 cm')
    expect(lengthText(0.0042)).toBe('4.2 mm')
  })
})

describe('same file: earlier lobes of the same file are named', () => {
  it('names each earlier lobe of the same units by number and name', () => {
    const w = sameFileWarning([{ id: 5, name: 'north lobe', units: 'km' }, { id: 9, name: 'again', units: 'km' }], 'km')!
    expect(w.code).toBe('same-file')
    expect(w.message).toContain('the same file as lobes #5 \'north lobe\', #9 \'again\'')
  })
  it('names lobes of the other units apart: one of the two readings is 1 000× off', () => {
    const w = sameFileWarning([{ id: 5, name: 'north lobe', units: 'm' }], 'km')!
    expect(w.message).not.toContain('same units')
    expect(w.message).toContain('read in metres as lobe #5 \'north lobe\'')
  })
  it('says nothing for a new file', () => {
    expect(sameFileWarning([], 'km')).toBeNull()
  })
})

describe('size check wording', () => {
  it('reads as sentences: no "?." after the question', () => {
    for (const [r, u] of [[4e5, 'km'], [4e5, 'm'], [0.3, 'm'], [0.3, 'km']] as const) {
      expect(sizeCheckWarning(r, u)!.message, `${r} ${u}`).not.toMatch(/[?.]\.|\?,/)
    }
  })
})
