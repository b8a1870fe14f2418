/**
 * PLY header: scalar types, elements and properties, the header parser and the per-element
 * size bounds used to check declared counts against the file size.
 */
import { GeometryError } from '../types'
import { latin1 } from './scan'

export interface PlyLimits { maxVertices: number, maxFaces: number }

/** Scalar type codes: size in bytes and whether integral. */
const TYPES: Record<string, { code: number, size: number, int: boolean }> = {
  char: { code: 0, size: 1, int: true }, int8: { code: 0, size: 1, int: true },
  uchar: { code: 1, size: 1, int: true }, uint8: { code: 1, size: 1, int: true },
  short: { code: 2, size: 2, int: true }, int16: { code: 2, size: 2, int: true },
  ushort: { code: 3, size: 2, int: true }, uint16: { code: 3, size: 2, int: true },
  int: { code: 4, size: 4, int: true }, int32: { code: 4, size: 4, int: true },
  uint: { code: 5, size: 4, int: true }, uint32: { code: 5, size: 4, int: true },
  float: { code: 6, size: 4, int: false }, float32: { code: 6, size: 4, int: false },
  double: { code: 7, size: 8, int: false }, float64: { code: 7, size: 8, int: false },
}
export const SIZES = [1, 1, 2, 2, 4, 4, 4, 8]

interface Prop { name: string, type: number, list: boolean, countType: number }
export interface Element { name: string, count: number, props: Prop[] }

export interface PlyHeader {
  format: 'ascii' | 'binary_little_endian' | 'binary_big_endian'
  elements: Element[]
  /** Byte offset where the body starts. */
  bodyStart: number
}

export function bad(what: string, line?: number): never {
  throw new GeometryError('bad-header', `readPly: ${what}${line ? ` (header line ${line})` : ''}`, line ? [{ path: `header.line[${line}]`, message: what }] : [])
}

const MAX_HEADER = 1 << 20

/** Parse the PLY header (ASCII lines up to and including `end_header`). */
export function parsePlyHeader(b: Uint8Array): PlyHeader {
  let i = 0
  let lineNo = 0
  let format: PlyHeader['format'] | undefined
  const elements: Element[] = []
  const limit = Math.min(b.length, MAX_HEADER)
  for (;;) {
    if (i >= limit) {
      if (b.length > MAX_HEADER) bad(`no end_header within the first ${MAX_HEADER} bytes`)
      throw new GeometryError('truncated', 'readPly: the file ends inside the header (no end_header)')
    }
    let e = b.indexOf(10, i)
    if (e < 0 || e > limit) e = limit
    lineNo++
    let le = e
    if (le > i && b[le - 1] === 13) le--
    for (let k = i; k < le; k++) {
      const c = b[k]!
      if (c < 32 && c !== 9) bad('binary bytes in the header', lineNo)
    }
    const text = latin1(b, i, le).trim()
    i = e + 1
    const w = text.split(/[ \t]+/)
    const kw = w[0]
    if (lineNo === 1) {
      if (text !== 'ply') bad('the first line must be "ply"', 1)
      continue
    }
    if (kw === '' || kw === 'comment' || kw === 'obj_info') continue
    if (kw === 'format') {
      if (w[1] !== 'ascii' && w[1] !== 'binary_little_endian' && w[1] !== 'binary_big_endian') bad(`format "${sanitize(w[1] ?? '')}" is not ascii, binary_little_endian or binary_big_endian`, lineNo)
      if (w[2] !== '1.0' && w[2] !== '1') bad(`format version "${sanitize(w[2] ?? '')}" is not supported (1.0 expected)`, lineNo)
      format = w[1]
    } else if (kw === 'element') {
      if (w.length < 3) bad('an element line needs a name and a count, e.g. "element vertex 8"', lineNo)
      if (w.length > 3) bad(`element ${sanitize(w[1]!)} line has more than a name and a count`, lineNo)
      if (!/^\d+$/.test(w[2]!)) bad(`element ${sanitize(w[1]!)} count "${sanitize(w[2]!)}" is not a whole number`, lineNo)
      const count = Number(w[2])
      if (!Number.isSafeInteger(count)) bad(`element ${sanitize(w[1]!)} count is too large`, lineNo)
      elements.push({ name: w[1]!, count, props: [] })
    } else if (kw === 'property') {
      const el = elements[elements.length - 1]
      if (!el) bad('property before any element', lineNo)
      if (w[1] === 'list') {
        const ct = TYPES[w[2]!]
        const it = TYPES[w[3]!]
        if (w.length !== 5) bad('a list property needs a count type, an index type and a name, e.g. "property list uchar int vertex_indices"', lineNo)
        if (!ct) bad(`unknown list count type "${sanitize(w[2]!)}"`, lineNo)
        if (!it) bad(`unknown list item type "${sanitize(w[3]!)}"`, lineNo)
        if (!ct.int) bad('list count type must be an integer type', lineNo)
        el.props.push({ name: w[4]!, type: it.code, list: true, countType: ct.code })
      } else {
        const t = TYPES[w[1]!]
        if (w.length !== 3) bad('a property line needs a type and a name, e.g. "property float x"', lineNo)
        if (!t) bad(`unknown property type "${sanitize(w[1]!)}" (char, uchar, short, ushort, int, uint, float, double or int8 … float64)`, lineNo)
        el.props.push({ name: w[2]!, type: t.code, list: false, countType: 0 })
      }
    } else if (kw === 'end_header') {
      break
    } else {
      bad(`unknown header keyword "${sanitize(kw ?? '')}"`, lineNo)
    }
  }
  if (!format) bad('no format line')
  return { format, elements, bodyStart: i }
}

export function elementMinBytes(el: Element, ascii: boolean, isFace: boolean): number {
  let n = 0
  for (const p of el.props) {
    if (ascii) n += p.list ? 2 + (isFace ? 6 : 0) : 2
    else n += p.list ? SIZES[p.countType]! + (isFace ? 3 * SIZES[p.type]! : 0) : SIZES[p.type]!
  }
  return Math.max(n, ascii ? 1 : 0)
}

/** Read one scalar of type `t` at byte offset `o`. */
export function readScalar(dv: DataView, o: number, t: number, le: boolean): number {
  switch (t) {
    case 0: return dv.getInt8(o)
    case 1: return dv.getUint8(o)
    case 2: return dv.getInt16(o, le)
    case 3: return dv.getUint16(o, le)
    case 4: return dv.getInt32(o, le)
    case 5: return dv.getUint32(o, le)
    case 6: return dv.getFloat32(o, le)
    default: return dv.getFloat64(o, le)
  }
}

export const TYPES_INT = [true, true, true, true, true, true, false, false]

export function sanitize(s: string): string {
  return s.replace(/[^A-Za-z0-9_-]/g, '?').slice(0, 40)
}
