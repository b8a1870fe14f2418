/**
 * Byte-level text scanning shared by the OBJ and PLY readers: Latin-1 slices, separators, exact
 * number parsing (see `parseNumber`), growable typed-array builders and the index range check.
 * Everything works on the raw bytes (never one big string: V8 strings end near 512 MiB).
 */
import { FILE_FACE_NUMBERING, GeometryError } from '../types'

// Node's Buffer has a native Latin-1 slice that also accepts a plain Uint8Array; elsewhere fall back.
const nativeLatin1 = (globalThis as { Buffer?: { prototype: { latin1Slice?: (this: Uint8Array, s: number, e: number) => string } } }).Buffer?.prototype.latin1Slice

/** Decode bytes [start, end) as Latin-1 (short slices only). */
export function latin1(b: Uint8Array, start: number, end: number): string {
  if (nativeLatin1) return nativeLatin1.call(b, start, end)
  let s = ''
  for (let i = start; i < end; i++) s += String.fromCharCode(b[i]!)
  return s
}

const POW10 = [1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22]
const MAX_EXACT = 9007199254740991

/** `cursor.end`: end offset of the last token read by `parseNumber` / `parseInteger`. */
export const cursor = { end: 0 }

/** True for bytes that end a token: space, tab, CR, LF, FF, VT, NUL, '#'. */
export function isSep(c: number): boolean {
  return c === 32 || c === 9 || c === 10 || c === 13 || c === 12 || c === 11 || c === 0 || c === 35
}

/**
 * Parse the number token starting at `i` (no leading spaces), ending at a separator or `end`.
 * Returns NaN when `Number()` would, and for hexadecimal, binary and octal spellings (`0x10`,
 * `0b1`, `0o7`), which `Number()` accepts but are no decimal number (the caller raises the error
 * with the line number); otherwise exactly the double `Number()` gives (correctly rounded, ties to even):
 * - ≤ 15 significant digits, |decimal exponent| ≤ 22: Clinger's fast path (integer mantissa and
 *   10^|e| are both exact doubles, so one IEEE multiply or divide rounds correctly);
 * - 16 to 19 significant digits, |exponent| ≤ 22 (what shortest round-trip writers produce):
 *   `roundDecimal`, double-double arithmetic with a proven error bound;
 * - anything else (more digits, larger exponents, `Infinity`): `Number()` on a decimal token.
 * Sets `cursor.end`.
 */
export function parseNumber(b: Uint8Array, i: number, end: number): number {
  const start = i
  let neg = false
  let c = b[i]!
  if (c === 45) { neg = true; i++ } else if (c === 43) i++
  // significant digits: the first 15 in `hi` (exact integer), the next ≤ 4 in `lo`
  let hi = 0, lo = 0, nlo = 0, e10 = 0
  let tooLong = false
  const intStart = i
  for (; i < end; i++) { // integer part
    c = b[i]! - 48
    if (c < 0 || c > 9) break
    if (hi < 1e14) hi = hi * 10 + c
    else if (nlo < 4) { lo = lo * 10 + c; nlo++ } else tooLong = true
  }
  let nd = i - intStart
  if (i < end && b[i] === 46 /* . */) {
    const fracStart = ++i
    for (; i < end; i++) { // fraction
      c = b[i]! - 48
      if (c < 0 || c > 9) break
      if (hi < 1e14) hi = hi * 10 + c
      else if (nlo < 4) { lo = lo * 10 + c; nlo++ } else tooLong = true
    }
    nd += i - fracStart
    e10 = fracStart - i
  }
  let ok = nd > 0 && !tooLong
  if (ok && i < end && (b[i] === 101 || b[i] === 69)) {
    i++
    let eneg = false
    if (i < end && (b[i] === 45 || b[i] === 43)) { eneg = b[i] === 45; i++ }
    let ev = 0
    let ed = 0
    while (i < end) {
      c = b[i]! - 48
      if (c < 0 || c > 9) break
      if (ev < 100000) ev = ev * 10 + c
      ed++
      i++
    }
    if (ed === 0) ok = false
    e10 += eneg ? -ev : ev
  }
  if (ok && (i >= end || isSep(b[i]!)) && e10 >= -22 && e10 <= 22) {
    cursor.end = i
    let v: number
    if (nlo === 0) v = e10 < 0 ? hi / POW10[-e10]! : hi * POW10[e10]! // Clinger fast path
    else v = roundDecimal(hi, lo, nlo, e10)
    if (!Number.isNaN(v)) return neg ? -v : v
  }
  return parseNumberSlow(b, start, end)
}

/**
 * A decimal number token as the OBJ and PLY formats write them: sign, digits with an optional point,
 * optional exponent; `Infinity` too (refused later as not finite). `Number()` alone would also take
 * hexadecimal, binary and octal spellings (`0x10` → 16, `0b1` → 1), which no mesh writer means.
 */
const DECIMAL_TOKEN = /^[+-]?(?:(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?|Infinity)$/

/** The whole token through `Number()` when it is a decimal token, else NaN (sets `cursor.end`). */
function parseNumberSlow(b: Uint8Array, start: number, end: number): number {
  let j = start
  while (j < end && !isSep(b[j]!)) j++
  cursor.end = j
  if (j - start > 400) return Number.NaN
  const token = latin1(b, start, j)
  return DECIMAL_TOKEN.test(token) ? Number(token) : Number.NaN
}

/** Veltkamp's splitting constant 2^27 + 1. */
const SPLITTER = 134217729

/**
 * Rounding error of the product p = fl(a·b): a·b − p, exact (Dekker's TwoProduct with
 * Veltkamp splitting; T. J. Dekker, "A floating-point technique for extending the available
 * precision", Numer. Math. 18, 1971). Needs no overflow or underflow, true for our operands.
 */
function productError(a: number, b: number, p: number): number {
  const ta = SPLITTER * a, ah = ta - (ta - a), al = a - ah
  const tb = SPLITTER * b, bh = tb - (tb - b), bl = b - bh
  return ((ah * bh - p) + ah * bl + al * bh) + al * bl
}

/** 2^-96: relative width of the interval `roundDecimal` checks around its estimate. */
const EPS_96 = 2 ** -96

/**
 * The double nearest to (hi·10^nlo + lo)·10^e10 (ties to even), for hi < 10^15, lo < 10^nlo,
 * 1 ≤ nlo ≤ 4, |e10| ≤ 22; NaN when the estimate lies too close to a rounding boundary to decide
 * (probability ≈ 2^-42; the caller then asks `Number()`).
 * The mantissa M is held exactly as mh + ml; X = M·10^e10 is evaluated as p1 + t with total
 * error below 2^-101·|X| (TwoProduct, and the exact division remainder a − fl(a/b)·b).
 * Round-to-nearest is monotone, so when p1 + (t ± 2ε) with ε = 2^-96|p1| round to the same
 * double, that double is the correctly rounded X.
 */
function roundDecimal(hi: number, lo: number, nlo: number, e10: number): number {
  const s = POW10[nlo]!
  const m0 = hi * s
  const mh = m0 + lo // TwoSum (Knuth): mh + sumErr = m0 + lo exactly
  const bv = mh - m0
  const sumErr = (m0 - (mh - bv)) + (lo - bv)
  const ml = productError(hi, s, m0) + sumErr // small integers: exact
  let p1: number, t: number
  if (e10 >= 0) {
    const p = POW10[e10]!
    p1 = mh * p
    t = productError(mh, p, p1) + ml * p
  } else {
    const p = POW10[-e10]!
    p1 = mh / p
    const u = p1 * p
    const rem = (mh - u) - productError(p1, p, u) // mh − p1·p, exact
    t = (rem + ml) / p
  }
  const eps2 = 2 * EPS_96 * Math.abs(p1)
  const up = p1 + (t + eps2), down = p1 + (t - eps2)
  return up === down ? up : Number.NaN
}

/**
 * Parse a decimal integer (optional sign) at `i`; stops at the first non-digit (so `12/5/7`
 * reads 12). Returns NaN when there are no digits or the value exceeds 2^53.
 * Sets `cursor.end`.
 */
export function parseInteger(b: Uint8Array, i: number, end: number): number {
  let neg = false
  let c = b[i]!
  if (c === 45) { neg = true; i++ } else if (c === 43) i++
  let v = 0
  let nd = 0
  while (i < end) {
    c = b[i]! - 48
    if (c < 0 || c > 9) break
    v = v * 10 + c
    nd++
    i++
  }
  cursor.end = i
  if (nd === 0 || v > MAX_EXACT) return Number.NaN
  return neg ? -v : v
}

/** Growable Uint32Array. */
export class U32Builder {
  a: Uint32Array
  n = 0
  constructor(cap: number) { this.a = new Uint32Array(Math.max(16, cap)) }
  grow(min: number): void {
    let cap = this.a.length * 2
    while (cap < min) cap *= 2
    const b = new Uint32Array(cap)
    b.set(this.a.subarray(0, this.n))
    this.a = b
  }

  finish(): Uint32Array { return this.a.length === this.n ? this.a : this.a.slice(0, this.n) }
}

/** Growable Float64Array. */
export class F64Builder {
  a: Float64Array
  n = 0
  constructor(cap: number) { this.a = new Float64Array(Math.max(16, cap)) }
  grow(min: number): void {
    let cap = this.a.length * 2
    while (cap < min) cap *= 2
    const b = new Float64Array(cap)
    b.set(this.a.subarray(0, this.n))
    this.a = b
  }

  finish(): Float64Array { return this.a.length === this.n ? this.a : this.a.slice(0, this.n) }
}

/**
 * Throw 'index-out-of-range' when an index is ≥ vertexCount. The message names the faces as the
 * file numbers them (`sourceFace`: triangle → face in the file, from 0).
 */
export function checkIndexRange(indices: Uint32Array, sourceFace: Uint32Array, vertexCount: number, who: string): void {
  let bad = 0
  const first: number[] = []
  for (let i = 0; i < indices.length; i++) {
    if (indices[i]! >= vertexCount) {
      bad++
      const f = sourceFace[(i / 3) | 0]!
      if (first.length < 5 && !first.includes(f)) first.push(f)
    }
  }
  if (bad > 0) {
    throw new GeometryError('index-out-of-range', `${who}: ${bad} vertex indices are out of range (the file has ${vertexCount} vertices); first faces: ${first.join(', ')} (${FILE_FACE_NUMBERING})`,
      first.map(f => ({ path: `faces[${f}]`, message: `vertex index out of range (the file has ${vertexCount} vertices)` })))
  }
}
