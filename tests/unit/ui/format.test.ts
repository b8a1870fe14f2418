import { describe, expect, it } from 'vitest'
import { fmt, fmtRange, fmtValue, fmtVec } from '../../../utils/format'
import { formatRecordNumber } from '../../../utils/records'

describe('display rounding: round-off residue shows as 0, real small values do not', () => {
  it('a unit vector built with cos(π/2) shows an exact 0', () => {
    // Math.PI is π rounded to float64, so cos(Math.PI/2) = 6.123233995736766e-17, not 0
    // (IEEE 754 double arithmetic; common practice, no source).
    const axis = [Math.cos(Math.PI / 2), Math.sin(Math.PI / 2), 0]
    expect(axis[0]).not.toBe(0)
    expect(fmtVec(axis)).toBe('(0, 1, 0)')
    expect(fmtVec([1, -4.996e-16, 0], 4)).toBe('(1, 0, 0)')
  })
  it('a small but real component is kept (1e-6 of the largest)', () => {
    expect(fmtVec([1, 1e-6, -2e-9])).toBe('(1, 1×10⁻⁶, -2×10⁻⁹)')
  })
  it('each row of a matrix is judged against its own largest component', () => {
    expect(fmtValue([[1, 3e-17, 0], [2e-20, 1e-5, 0]], 4)).toBe('(1, 0, 0) (0, 1×10⁻⁵, 0)')
  })
  it('a centre of mass of ~1e-15 m on a body of 10 km shows as 0 only when the size is given', () => {
    const centroid = [1.2e-15, -3.4e-15, 8e-16]
    expect(fmtValue(centroid, 5, 10_000)).toBe('(0, 0, 0)')
    // without a size the vector's own largest component is the scale: values are kept
    expect(fmtValue(centroid)).toBe('(1.2×10⁻¹⁵, -3.4×10⁻¹⁵, 8×10⁻¹⁶)')
    // a real offset of 1 mm on the same body stays
    expect(fmtValue([1e-3, 0, 0], 5, 10_000)).toBe('(0.001, 0, 0)')
  })
  it('scalars: only with a scale; ranges relative to their largest member', () => {
    expect(fmt(3e-17)).toBe('3×10⁻¹⁷')
    expect(fmt(3e-17, 5, 1)).toBe('0')
    expect(fmt(-0)).toBe('0')
    expect(fmtRange({ min: 1e-14, max: 120, mean: 60 })).toBe('60 (0 – 120)')
  })
})

describe('formatRecordNumber (record pages): the lobe pages\' notation', () => {
  it('keeps short values exact, rounds long ones to 6 digits, and writes powers of ten as ×10ⁿ', () => {
    expect(formatRecordNumber(0.56712)).toBe('0.56712')
    expect(formatRecordNumber(203.66608026658307)).toBe('203.666')
    expect(formatRecordNumber(2992912345678.9)).toBe('2.99291×10¹²')
    expect(formatRecordNumber(3e21)).toBe('3×10²¹')
    expect(formatRecordNumber(-4.2e-7)).toBe('-4.2×10⁻⁷')
    expect(formatRecordNumber(1.23456789e-5)).toBe('1.23457×10⁻⁵')
  })
})
