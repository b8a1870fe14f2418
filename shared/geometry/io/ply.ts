/**
 * Stanford PLY reader: ascii, binary_little_endian and binary_big_endian bodies; coordinates of
 * any scalar type (float, double, integers); extra vertex properties in any order; other elements
 * before or after (skipped correctly, list properties included); the face list named
 * `vertex_indices` or `vertex_index` with any integer count and index types; polygons are
 * fan-triangulated. `comment` / `obj_info` header lines are ignored; in ascii bodies `#` starts a
 * comment to the end of the line and lines starting with `comment` are skipped.
 * Declared counts are checked against what the file size can hold before anything is allocated.
 */
import type { TriMesh } from '../types'
import { FILE_FACE_NUMBERING, GeometryError } from '../types'
import type { Element, PlyHeader, PlyLimits } from './ply-header'
import { SIZES, TYPES_INT, bad, elementMinBytes, parsePlyHeader, readScalar, sanitize } from './ply-header'
import { U32Builder, checkIndexRange, cursor, isSep, parseNumber } from './scan'

/** Parse PLY bytes. See `readMesh` for the errors. */
export function readPly(b: Uint8Array, limits: PlyLimits): { mesh: TriMesh, sourceFaceCount: number, triangulatedPolygons: number } {
  const h = parsePlyHeader(b)
  const ascii = h.format === 'ascii'
  const vEl = h.elements.find(e => e.name === 'vertex')
  const fEl = h.elements.find(e => e.name === 'face')
  if (!vEl) bad('no "vertex" element')
  if (!fEl) bad('no "face" element')
  const xyz = ['x', 'y', 'z'].map(n => vEl.props.findIndex(p => p.name === n && !p.list))
  if (xyz.some(k => k < 0)) bad('vertex element lacks x, y or z scalar properties')
  const fi = fEl.props.findIndex(p => p.list && (p.name === 'vertex_indices' || p.name === 'vertex_index'))
  if (fi < 0) bad('face element has no vertex_indices / vertex_index list')
  if (!TYPES_INT[fEl.props[fi]!.type]) bad('face index type must be an integer type')
  if (vEl.count > limits.maxVertices) throw new GeometryError('too-large', `readPly: ${vEl.count} vertices declared, limit ${limits.maxVertices}`)
  if (fEl.count > limits.maxFaces) throw new GeometryError('too-large', `readPly: ${fEl.count} faces declared, limit ${limits.maxFaces}`)
  // what the remaining bytes can hold, before allocating anything
  let minBytes = 0
  for (const el of h.elements) minBytes += el.count * elementMinBytes(el, ascii, el === fEl)
  const avail = b.length - h.bodyStart
  if (minBytes > avail) {
    throw new GeometryError('truncated', `readPly: the header declares ${vEl.count} vertices and ${fEl.count} faces, which need at least ${minBytes} bytes, but the body has ${avail}`)
  }
  return ascii ? readAsciiBody(b, h, vEl, fEl, xyz, fi, limits) : readBinaryBody(b, h, vEl, fEl, xyz, fi, limits)
}

function truncated(what: string): never {
  throw new GeometryError('truncated', `readPly: the file ends inside ${what}`)
}

function readBinaryBody(b: Uint8Array, h: PlyHeader, vEl: Element, fEl: Element, xyz: number[], fi: number, limits: PlyLimits) {
  const le = h.format === 'binary_little_endian'
  const dv = new DataView(b.buffer, b.byteOffset, b.byteLength)
  const end = b.length
  let o = h.bodyStart
  const positions = new Float64Array(vEl.count * 3)
  const idx = new U32Builder(fEl.count * 3)
  const src = new U32Builder(fEl.count) // triangle → face number in the file (from 0)
  let sourceFaces = 0
  let triangulated = 0
  let indicesChecked = false
  for (const el of h.elements) {
    const fixed = el.props.every(p => !p.list)
    const commonFaces = el === fEl && el.props.length === 1 && el.props[0]!.countType === 1 && SIZES[el.props[0]!.type] === 4
    const tri = commonFaces && idx.n === 0 && readTriangleList(dv, o, el.count, el.props[0]!.type === 4, le, vEl.count, idx.a, src.a)
    if (el === vEl && fixed) {
      // fixed stride: offsets of x, y, z
      const offs: number[] = []
      let stride = 0
      for (const p of el.props) { offs.push(stride); stride += SIZES[p.type]! }
      if (o + stride * el.count > end) truncated('the vertex element')
      const [ox, oy, oz] = xyz.map(k => offs[k]!)
      const [tx, ty, tz] = xyz.map(k => el.props[k]!.type)
      if (tx === 6 && ty === 6 && tz === 6) {
        for (let v = 0; v < el.count; v += BLOCK) float32Block(dv, o, stride, ox!, oy!, oz!, v, Math.min(el.count, v + BLOCK), le, positions)
        o += stride * el.count
      } else if (tx === 7 && ty === 7 && tz === 7) {
        for (let v = 0; v < el.count; v++, o += stride) {
          positions[3 * v] = dv.getFloat64(o + ox!, le)
          positions[3 * v + 1] = dv.getFloat64(o + oy!, le)
          positions[3 * v + 2] = dv.getFloat64(o + oz!, le)
        }
      } else {
        for (let v = 0; v < el.count; v++, o += stride) {
          positions[3 * v] = readScalar(dv, o + ox!, tx!, le)
          positions[3 * v + 1] = readScalar(dv, o + oy!, ty!, le)
          positions[3 * v + 2] = readScalar(dv, o + oz!, tz!, le)
        }
      }
    } else if (fixed) {
      let stride = 0
      for (const p of el.props) stride += SIZES[p.type]!
      o += stride * el.count
      if (o > end) truncated(`element "${sanitize(el.name)}"`)
    } else if (tri) {
      // the usual layout, uchar count 3 and 4-byte indices on every face: read in one tight pass
      idx.n = 3 * el.count
      src.n = el.count
      sourceFaces = el.count
      indicesChecked = true
      o += 13 * el.count
    } else if (commonFaces) {
      // the common face layout: uchar count, 4-byte indices
      const signed = el.props[0]!.type === 4
      for (let f = 0; f < el.count; f++) {
        if (o >= end) truncated('the face element')
        const n = b[o]!
        o++
        if (o + 4 * n > end) truncated('the face element')
        if (n < 3) throw badFace(f, n)
        sourceFaces++
        if (n > 3) triangulated++
        const add = 3 * (n - 2)
        if (idx.n + add > idx.a.length) idx.grow(idx.n + add)
        if ((idx.n + add) / 3 > limits.maxFaces) throw new GeometryError('too-large', `readPly: more than ${limits.maxFaces} triangles`)
        addSource(src, f, n - 2)
        const a = idx.a
        const v0 = signed ? dv.getInt32(o, le) : dv.getUint32(o, le)
        if (v0 < 0) throw negIndex(f)
        let prev = signed ? dv.getInt32(o + 4, le) : dv.getUint32(o + 4, le)
        if (prev < 0) throw negIndex(f)
        for (let k = 2; k < n; k++) {
          const cur = signed ? dv.getInt32(o + 4 * k, le) : dv.getUint32(o + 4 * k, le)
          if (cur < 0) throw negIndex(f)
          a[idx.n++] = v0; a[idx.n++] = prev; a[idx.n++] = cur
          prev = cur
        }
        o += 4 * n
      }
    } else {
      // general walk, item by item
      for (let item = 0; item < el.count; item++) {
        for (let pi = 0; pi < el.props.length; pi++) {
          const p = el.props[pi]!
          if (!p.list) {
            const s = SIZES[p.type]!
            if (o + s > end) truncated(`element "${sanitize(el.name)}"`)
            if (el === vEl) {
              const k = xyz.indexOf(pi)
              if (k >= 0) positions[3 * item + k] = readScalar(dv, o, p.type, le)
            }
            o += s
            continue
          }
          const cs = SIZES[p.countType]!
          if (o + cs > end) truncated(`element "${sanitize(el.name)}"`)
          const n = readScalar(dv, o, p.countType, le)
          o += cs
          if (n < 0) throw new GeometryError('bad-face', `readPly: negative list length in element "${sanitize(el.name)}" item ${item}`)
          const s = SIZES[p.type]!
          if (o + s * n > end) truncated(`element "${sanitize(el.name)}"`)
          if (el === fEl && pi === fi) {
            if (n < 3) throw badFace(item, n)
            sourceFaces++
            if (n > 3) triangulated++
            const add = 3 * (n - 2)
            if (idx.n + add > idx.a.length) idx.grow(idx.n + add)
            if ((idx.n + add) / 3 > limits.maxFaces) throw new GeometryError('too-large', `readPly: more than ${limits.maxFaces} triangles`)
            addSource(src, item, n - 2)
            const a = idx.a
            const v0 = readScalar(dv, o, p.type, le)
            let prev = readScalar(dv, o + s, p.type, le)
            if (v0 < 0 || prev < 0) throw negIndex(item)
            for (let k = 2; k < n; k++) {
              const cur = readScalar(dv, o + s * k, p.type, le)
              if (cur < 0) throw negIndex(item)
              a[idx.n++] = v0; a[idx.n++] = prev; a[idx.n++] = cur
              prev = cur
            }
          }
          o += s * n
        }
      }
    }
  }
  return finish(positions, idx, src, vEl.count, sourceFaces, triangulated, indicesChecked)
}

/**
 * Face list of `count` faces at byte offset o, each a uchar count followed by 4-byte indices:
 * when every face is a triangle (count byte 3) and every index lies in 0 .. vertexCount − 1,
 * writes the indices and the source face of each triangle (the identity) into `indices` (3·count)
 * and `sourceFace` (count) and returns true. False otherwise (or when the bytes run out): the
 * face-by-face walk then reads the element again and names the faulty face.
 */
function readTriangleList(dv: DataView, o: number, count: number, signed: boolean, le: boolean, vertexCount: number, indices: Uint32Array, sourceFace: Uint32Array): boolean {
  if (o + 13 * count > dv.byteLength || indices.length < 3 * count || sourceFace.length < count) return false
  // signed indices are read unsigned: a negative one becomes ≥ 2^31 and fails the range test
  let max = 0
  for (let f = 0; f < count; f += BLOCK) {
    const m = triangleBlock(dv, o, f, Math.min(count, f + BLOCK), le, indices, sourceFace)
    if (m < 0) return false
    if (m > max) max = m
  }
  return max < vertexCount && !(signed && max >= 2 ** 31)
}

/** Faces or vertices per call of the block readers (called per block so that V8 optimises them early). */
const BLOCK = 32768

/**
 * Reads faces from .. to−1 of `readTriangleList` into indices and sourceFace; returns the largest
 * index, or −1 at the first face whose count byte is not 3.
 */
function triangleBlock(dv: DataView, o: number, from: number, to: number, le: boolean, indices: Uint32Array, sourceFace: Uint32Array): number {
  let max = 0
  for (let f = from, p = o + 13 * from; f < to; f++, p += 13) {
    if (dv.getUint8(p) !== 3) return -1
    const a = dv.getUint32(p + 1, le), b = dv.getUint32(p + 5, le), c = dv.getUint32(p + 9, le)
    indices[3 * f] = a; indices[3 * f + 1] = b; indices[3 * f + 2] = c
    sourceFace[f] = f
    const m = a > b ? a : b
    if (m > max) max = m
    if (c > max) max = c
  }
  return max
}

/** Vertices from .. to−1 of a fixed-stride vertex element at byte offset o, x y z float32 at offsets ox, oy, oz. */
function float32Block(dv: DataView, o: number, stride: number, ox: number, oy: number, oz: number, from: number, to: number, le: boolean, positions: Float64Array): void {
  for (let v = from, p = o + stride * from; v < to; v++, p += stride) {
    positions[3 * v] = dv.getFloat32(p + ox, le)
    positions[3 * v + 1] = dv.getFloat32(p + oy, le)
    positions[3 * v + 2] = dv.getFloat32(p + oz, le)
  }
}

/** Record that the next `count` triangles come from face `face` of the file. */
function addSource(src: U32Builder, face: number, count: number) {
  if (src.n + count > src.a.length) src.grow(src.n + count)
  for (let k = 0; k < count; k++) src.a[src.n++] = face
}

function finish(positions: Float64Array, idx: U32Builder, src: U32Builder, nv: number, sourceFaces: number, triangulated: number, indicesChecked = false) {
  if (nv === 0 || idx.n === 0) throw new GeometryError('empty-mesh', `readPly: no ${nv === 0 ? 'vertices' : 'faces'}`)
  const indices = idx.finish()
  const sourceFace = src.finish()
  if (!indicesChecked) checkIndexRange(indices, sourceFace, nv, 'readPly')
  return { mesh: { positions, indices, sourceFace }, sourceFaceCount: sourceFaces, triangulatedPolygons: triangulated }
}

function badFace(f: number, n: number): GeometryError {
  return new GeometryError('bad-face', `readPly: face ${f} has ${n} vertices, at least 3 needed (${FILE_FACE_NUMBERING})`, [{ path: `faces[${f}]`, message: `${n} vertices` }])
}
function negIndex(f: number): GeometryError {
  return new GeometryError('index-out-of-range', `readPly: face ${f} has a negative vertex index (${FILE_FACE_NUMBERING})`, [{ path: `faces[${f}]`, message: 'negative vertex index' }])
}

function readAsciiBody(b: Uint8Array, h: PlyHeader, vEl: Element, fEl: Element, xyz: number[], fi: number, limits: PlyLimits) {
  const end = b.length
  let i = h.bodyStart
  let line = 0 // body line number
  const positions = new Float64Array(vEl.count * 3)
  const idx = new U32Builder(fEl.count * 3)
  const src = new U32Builder(fEl.count) // triangle → face number in the file (from 0)
  let sourceFaces = 0
  let triangulated = 0
  let poly = new Float64Array(64)
  const mismatch = (what: string): never => {
    throw new GeometryError('count-mismatch', `readPly: ${what} (body line ${line})`, [{ path: `body.line[${line}]`, message: what }])
  }
  /** Advance to the start of the next data line (skipping blank and comment lines); false at EOF. */
  const nextLine = (): boolean => {
    for (;;) {
      while (i < end && (b[i] === 32 || b[i] === 9 || b[i] === 13 || b[i] === 12)) i++
      if (i >= end) return false
      const c = b[i]!
      if (c === 10) { i++; line++; continue }
      if (c === 35 || (c === 99 && b[i + 1] === 111 && b[i + 2] === 109 && b[i + 3] === 109 && b[i + 4] === 101 && b[i + 5] === 110 && b[i + 6] === 116 && (i + 7 >= end || isSep(b[i + 7]!)))) {
        const e = b.indexOf(10, i)
        if (e < 0) { i = end; return false }
        i = e + 1; line++
        continue
      }
      line++
      return true
    }
  }
  /** Next token on the current line; NaN when the line has ended. Sets `i` after it. */
  let lineEnded = false
  const token = (): number => {
    while (i < end && (b[i] === 32 || b[i] === 9 || b[i] === 13 || b[i] === 12)) i++
    if (i >= end || b[i] === 10 || b[i] === 35) { lineEnded = true; return Number.NaN }
    const v = parseNumber(b, i, end)
    i = cursor.end
    if (Number.isNaN(v)) throw new GeometryError('bad-number', `readPly: unparsable number (body line ${line})`, [{ path: `body.line[${line}]`, message: 'unparsable number' }])
    return v
  }
  const endLine = (what: string) => {
    while (i < end && (b[i] === 32 || b[i] === 9 || b[i] === 13 || b[i] === 12)) i++
    if (i < end && b[i] !== 10 && b[i] !== 35) mismatch(`more values than declared on a ${what} line`)
    const e = b.indexOf(10, i)
    i = e < 0 ? end : e + 1
  }
  for (const el of h.elements) {
    const name = sanitize(el.name)
    for (let item = 0; item < el.count; item++) {
      if (!nextLine()) truncated(`element "${name}" (item ${item} of ${el.count})`)
      lineEnded = false
      for (let pi = 0; pi < el.props.length; pi++) {
        const p = el.props[pi]!
        if (!p.list) {
          const v = token()
          if (lineEnded) mismatch(`fewer values than declared on a ${name} line`)
          if (el === vEl) {
            const k = xyz.indexOf(pi)
            if (k >= 0) positions[3 * item + k] = v
          }
          continue
        }
        const n = token()
        if (lineEnded) mismatch(`fewer values than declared on a ${name} line`)
        if (!Number.isInteger(n) || n < 0 || n > 1e7) mismatch(`bad list length on a ${name} line`)
        if (n > poly.length) poly = new Float64Array(n)
        for (let k = 0; k < n; k++) {
          const v = token()
          if (lineEnded) mismatch(`fewer list values than the list length on a ${name} line`)
          poly[k] = v
        }
        if (el === fEl && pi === fi) {
          if (n < 3) throw badFace(item, n)
          for (let k = 0; k < n; k++) {
            const v = poly[k]!
            if (!Number.isInteger(v)) mismatch('non-integer vertex index')
            if (v < 0 || v > 0xfffffffe) throw negIndex(item)
          }
          sourceFaces++
          if (n > 3) triangulated++
          const add = 3 * (n - 2)
          if (idx.n + add > idx.a.length) idx.grow(idx.n + add)
          if ((idx.n + add) / 3 > limits.maxFaces) throw new GeometryError('too-large', `readPly: more than ${limits.maxFaces} triangles`)
          addSource(src, item, n - 2)
          const a = idx.a
          for (let k = 1; k + 1 < n; k++) { a[idx.n++] = poly[0]!; a[idx.n++] = poly[k]!; a[idx.n++] = poly[k + 1]! }
        }
      }
      endLine(name)
    }
  }
  if (nextLine()) mismatch('data after the last declared element')
  return finish(positions, idx, src, vEl.count, sourceFaces, triangulated)
}
