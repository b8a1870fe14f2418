/**
 * Mesh readers: format sniffing and the byte-level helpers shared by the OBJ and PLY parsers.
 *
 * Everything works on the raw bytes (never one big string: V8 strings end near 512 MiB) and fills
 * Float64Array positions / Uint32Array indices directly. Numbers are parsed exactly as `Number()`
 * would: plain decimals with ≤ 15 significant digits and |exponent| ≤ 22 take an exact fast path
 * (W. D. Clinger, "How to read floating point numbers accurately", PLDI 1990: both operands exact,
 * one correctly rounded operation), 16–19 digits an exact double-double path, anything else
 * `Number()` on the short token (see `parseNumber`).
 */
import { FILE_FACE_NUMBERING, GeometryError } from './types'
import type { TriMesh } from './types'
import { readObj } from './obj'
import { readPly } from './ply'

export interface ReadOptions {
  /** Force a format instead of sniffing. */
  format?: 'obj' | 'ply'
  /** Refuse files with more vertices than this (default 10 000 000). */
  maxVertices?: number
  /** Refuse files with more triangles (after triangulation) than this (default 20 000 000). */
  maxFaces?: number
}

export interface ReadResult {
  mesh: TriMesh
  format: 'obj' | 'ply'
  /** Number of faces (polygons) in the file, before triangulation; `mesh.sourceFace` maps triangles to them. */
  sourceFaceCount: number
  /** Number of polygons with more than three vertices that were fan-triangulated. */
  triangulatedPolygons: number
}

export const DEFAULT_MAX_VERTICES = 10_000_000
export const DEFAULT_MAX_FACES = 20_000_000

/**
 * Read a triangle mesh from OBJ or PLY bytes.
 * Format: `opts.format`, else PLY when the file starts with `ply` + newline, else OBJ when the
 * start of the file is text whose first keyword is an OBJ keyword, else 'unknown-format'.
 * Polygons are fan-triangulated (v0, vi, vi+1). Indices are checked against the vertex count;
 * everything else (closedness, winding, duplicates) is left to `validateMesh`.
 * @throws GeometryError 'empty-file', 'unknown-format', 'bad-header', 'truncated',
 *   'count-mismatch', 'bad-number', 'bad-face', 'index-out-of-range', 'too-large', 'empty-mesh'.
 */
export function readMesh(bytes: Uint8Array, opts: ReadOptions = {}): ReadResult {
  const limits = {
    maxVertices: opts.maxVertices ?? DEFAULT_MAX_VERTICES,
    maxFaces: opts.maxFaces ?? DEFAULT_MAX_FACES,
  }
  if (bytes.length === 0 || isBlank(bytes)) throw new GeometryError('empty-file', 'readMesh: the file is empty')
  const format = opts.format ?? sniffFormat(bytes)
  const r = format === 'ply' ? readPly(bytes, limits) : readObj(bytes, limits)
  return { ...r, format }
}

function isBlank(b: Uint8Array): boolean {
  const n = Math.min(b.length, 4096)
  for (let i = 0; i < n; i++) {
    const c = b[i]!
    if (c !== 32 && c !== 9 && c !== 10 && c !== 13 && c !== 0) return false
  }
  return b.length <= 4096
}

const OBJ_KEYWORDS = new Set(['v', 'vt', 'vn', 'vp', 'f', 'o', 'g', 's', 'l', 'p', 'usemtl', 'mtllib', 'cstype', 'deg', 'curv', 'surf', 'mg', 'maplib', 'usemap', 'bevel', 'c_interp', 'd_interp', 'lod', 'shadow_obj', 'trace_obj'])

/** 'ply' | 'obj' for recognisable content, else throws 'unknown-format'. */
export function sniffFormat(b: Uint8Array): 'obj' | 'ply' {
  if (b.length >= 4 && b[0] === 0x70 && b[1] === 0x6c && b[2] === 0x79 && (b[3] === 10 || (b[3] === 13 && b[4] === 10))) return 'ply'
  // OBJ: text (no control bytes) in the first 4 KiB, first keyword an OBJ keyword
  let i = b.length >= 3 && b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf ? 3 : 0
  const n = Math.min(b.length, 4096)
  for (let k = i; k < n; k++) {
    const c = b[k]!
    if (c < 32 && c !== 9 && c !== 10 && c !== 13 && c !== 12) throw new GeometryError('unknown-format', 'readMesh: not a PLY file (no "ply" magic) and not OBJ text (binary bytes near the start)')
  }
  const limit = Math.min(b.length, 1 << 16)
  while (i < limit) {
    while (i < limit && (b[i] === 32 || b[i] === 9 || b[i] === 13 || b[i] === 10 || b[i] === 12)) i++
    if (i >= limit) break
    if (b[i] === 35) { // comment
      const e = b.indexOf(10, i)
      if (e < 0) break
      i = e + 1
      continue
    }
    let j = i
    while (j < b.length && b[j] !== 32 && b[j] !== 9 && b[j] !== 10 && b[j] !== 13) j++
    if (j - i <= 12 && OBJ_KEYWORDS.has(latin1(b, i, j))) return 'obj'
    break
  }
  throw new GeometryError('unknown-format', 'readMesh: not a PLY file (no "ply" magic) and not recognisable OBJ (no OBJ keyword at the start)')
}

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
 * Returns NaN when `Number()` would (the caller raises the error with the line number), and
 * otherwise exactly the double `Number()` gives (correctly rounded, ties to even):
 * - ≤ 15 significant digits, |decimal exponent| ≤ 22: Clinger's fast path (integer mantissa and
 *   10^|e| are both exact doubles, so one IEEE multiply or divide rounds correctly);
 * - 16 to 19 significant digits, |exponent| ≤ 22 (what shortest round-trip writers produce):
 *   `roundDecimal`, double-double arithmetic with a proven error bound;
 * - anything else (more digits, larger exponents, inf/hex spellings): `Number()` on the token.
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

/** The whole token through `Number()` (sets `cursor.end`). */
function parseNumberSlow(b: Uint8Array, start: number, end: number): number {
  let j = start
  while (j < end && !isSep(b[j]!)) j++
  cursor.end = j
  if (j - start > 400) return Number.NaN
  return Number(latin1(b, start, j))
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
