/**
 * The byte-level float parser used by the OBJ and PLY ASCII readers must return exactly what the
 * JavaScript `Number()` conversion returns for the same token (ECMAScript StringToNumber:
 * correctly rounded, ties to even; ECMA-262 §7.1.4.1.1). `Number()` is the reference here.
 */
import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { cursor, parseNumber } from '#shared/geometry/io/scan'

const enc = (s: string) => new TextEncoder().encode(s)
/** Parse `s` followed by a separator, check the token end, and compare with Number(s) bit for bit. */
function agrees(s: string): boolean {
  const b = enc(`${s} `)
  const v = parseNumber(b, 0, b.length)
  if (!Number.isNaN(v)) expect(cursor.end).toBe(s.length)
  return Object.is(v, Number(s))
}

const digitString = (min: number, max: number) => fc.array(fc.integer({ min: 0, max: 9 }), { minLength: min, maxLength: max }).map(d => d.join(''))
/** Random decimal literal: sign, digits with a point anywhere (or none), optional exponent. */
const decimal = fc.tuple(fc.constantFrom('', '-', '+'), digitString(1, 24), fc.nat(), fc.option(fc.integer({ min: -40, max: 40 }), { nil: undefined }), fc.constantFrom('e', 'E'))
  .map(([sign, d, p, e, E]) => {
    const at = p % (d.length + 1)
    return `${sign}${d.slice(0, at)}.${d.slice(at)}${e === undefined ? '' : `${E}${e}`}`.replace(/\.$/, '.')
  })

describe('parseNumber equals Number()', () => {
  it('random decimal literals: 1–24 digits, point anywhere, exponents −40..40', () => {
    fc.assert(fc.property(decimal, s => agrees(s)), { numRuns: 20000, seed: 42 })
  })

  it('shortest round-trip spellings of random doubles (what writers emit, 16–17 digits)', () => {
    fc.assert(fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), x => agrees(String(x)) && agrees(x.toExponential())), { numRuns: 20000, seed: 7 })
  })

  it('16–21 significant digits around magnitudes 1e-12..1e12 (near rounding boundaries)', () => {
    const arb = fc.tuple(fc.double({ min: 1, max: 10, noNaN: true }), fc.integer({ min: 16, max: 21 }), fc.integer({ min: -12, max: 12 }))
      .map(([x, p, e]) => (x * 10 ** e).toPrecision(p))
    fc.assert(fc.property(arb, s => agrees(s)), { numRuns: 20000, seed: 3 })
  })

  it('exact midpoints between adjacent doubles round to even: integers 2^53..2^64', () => {
    // An odd integer n in (2^53, 2^54) lies halfway between the doubles n−1 and n+1.
    const arb = fc.bigInt({ min: 2n ** 53n, max: 2n ** 64n - 1n }).chain(n => fc.constantFrom(n, n | 1n, (n >> 11n << 11n) | (1n << 10n)))
    fc.assert(fc.property(arb, n => agrees(n.toString()) && agrees(`${n}e-3`) && agrees(`-${n}.000`)), { numRuns: 20000, seed: 11 })
  })

  it('fixed cases: subnormals, extremes, ties, odd spellings, malformed tokens', () => {
    const cases = [
      '9007199254740993', '9007199254740995', '18014398509481990', '0.1', '0.30000000000000004', '1e22', '1e23', '9.999999999999999e22',
      '2.2250738585072014e-308', '2.225073858507201e-308', '4.9e-324', '2.4703282292062327e-324', '2.4703282292062328e-324', '1.7976931348623157e308',
      '1.7976931348623158e308', '1.7976931348623159e308', '123456789012345678', '1234567890123456789', '0.000000000000000000001', '-0', '-0.0e5', '+.5', '5.', '.e1',
      '.', '-', '1e', '1e+', '1.2.3', 'Infinity', '-Infinity', '1_0', '00000000000000000000012.5', '1' + '0'.repeat(30), '4.35679e-18', '7.0000000000000001e-22',
    ]
    for (const s of cases) expect(agrees(s), s).toBe(true)
  })

  it('refuses hexadecimal, binary and octal spellings that Number() would take (NaN: the reader names the line)', () => {
    for (const s of ['0x10', '-0x10', '0X1F', '0b1', '0B101', '0o7', '0x1p3', '1_000']) {
      const b = new TextEncoder().encode(`${s} `)
      expect(Number.isNaN(parseNumber(b, 0, b.length)), s).toBe(true)
    }
  })
})
