/**
 * Wavefront OBJ reader (geometry only): `v x y z [w | r g b]` and `f` lines with `v`, `v/vt`,
 * `v/vt/vn`, `v//vn` references, 1-based or negative (relative) indices; polygons fan-triangulated.
 * Comments (`#`, also at line ends), blank lines, CRLF and every other statement (o, g, s, usemtl,
 * mtllib, vt, vn, l, p, ...) are ignored. Line continuation (`\`) is not supported.
 */
import type { TriMesh } from '../types'
import { GeometryError } from '../types'
import { F64Builder, U32Builder, checkIndexRange, cursor, isSep, parseNumber } from './scan'

export interface ObjLimits { maxVertices: number, maxFaces: number }

function fail(code: string, what: string, line: number): never {
  throw new GeometryError(code, `readObj: ${what} at line ${line}`, [{ path: `line[${line}]`, message: what }])
}

/**
 * Count the `v` and `f` statements (lines whose first word is `v` or `f`, after leading blanks)
 * in one pass over the bytes, so that the output arrays can be allocated at their final size.
 */
export function countObjStatements(b: Uint8Array): { vertices: number, faces: number } {
  let vertices = 0, faces = 0
  const end = b.length
  let i = 0
  while (i < end) {
    let c = b[i]!
    while (c === 32 || c === 9) c = ++i < end ? b[i]! : 10
    const next = i + 1 < end ? b[i + 1]! : 10
    if (next === 32 || next === 9) {
      if (c === 118) vertices++
      else if (c === 102) faces++
    }
    const e = b.indexOf(10, i)
    if (e < 0) break
    i = e + 1
  }
  return { vertices, faces }
}

/** Index of the next LF at or after i, or `end`. A byte loop: most lines end within a few bytes. */
function lineEnd(b: Uint8Array, i: number, end: number): number {
  while (i < end && b[i] !== 10) i++
  return i
}

/** Parse OBJ bytes. See `readMesh` for the errors. */
export function readObj(b: Uint8Array, limits: ObjLimits): { mesh: TriMesh, sourceFaceCount: number, triangulatedPolygons: number } {
  const end = b.length
  // allocate at the final size for triangles (polygons with more vertices grow the builders)
  const counts = countObjStatements(b)
  const pos = new F64Builder(Math.min(counts.vertices, limits.maxVertices) * 3)
  const idx = new U32Builder(Math.min(counts.faces, limits.maxFaces) * 3)
  const src = new U32Builder(Math.min(counts.faces, limits.maxFaces)) // triangle → face number in the file (from 0)
  let nv = 0
  let sourceFaces = 0
  let triangulated = 0
  let poly = new Int32Array(64)
  let line = 0
  let i = b.length >= 3 && b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf ? 3 : 0
  while (i < end) {
    line++
    // skip leading blanks
    let c = b[i]!
    while (c === 32 || c === 9) { i++; c = i < end ? b[i]! : 10 }
    const next = b[i + 1]
    if (c === 118 /* v */ && (next === 32 || next === 9)) {
      if (nv >= limits.maxVertices) throw new GeometryError('too-large', `readObj: more than ${limits.maxVertices} vertices`)
      if (pos.n + 3 > pos.a.length) pos.grow(pos.n + 3)
      i = readVertex(b, i + 2, end, pos, line)
      nv++
    } else if (c === 102 /* f */ && (next === 32 || next === 9)) {
      // the face's vertex references (0-based) go to `poly`
      for (;;) {
        const n = readFaceRefs(b, i + 2, end, poly, nv, line)
        if (n >= 0) break
        poly = new Int32Array(poly.length * 2) // more references than room: read the line again
      }
      const n = faceRefs.n
      i = faceRefs.end
      if (n < 3) fail('bad-face', `face with ${n} vertices (at least 3 needed)`, line)
      if (n > 3) triangulated++
      if ((idx.n / 3) + n - 2 > limits.maxFaces) throw new GeometryError('too-large', `readObj: more than ${limits.maxFaces} triangles`)
      addFan(poly, n, sourceFaces++, idx, src)
      i = lineEnd(b, i, end)
      i++
      continue
    }
    // to the end of the line (rest of a v line: w or colours; comments; other statements)
    if (c === 118) { i = lineEnd(b, i, end) + 1; continue }
    const e = b.indexOf(10, i)
    if (e < 0) break
    i = e + 1
  }
  if (nv === 0 || idx.n === 0) throw new GeometryError('empty-mesh', `readObj: no ${nv === 0 ? 'vertices' : 'faces'} found`)
  const indices = idx.finish()
  const sourceFace = src.finish()
  checkIndexRange(indices, sourceFace, nv, 'readObj')
  return { mesh: { positions: pos.finish(), indices, sourceFace }, sourceFaceCount: sourceFaces, triangulatedPolygons: triangulated }
}

/** Reads the three coordinates of a `v` line starting at i (after `v `) into pos; returns the offset after them. */
function readVertex(b: Uint8Array, i: number, end: number, pos: F64Builder, line: number): number {
  const a = pos.a
  for (let k = 0; k < 3; k++) {
    while (i < end && (b[i] === 32 || b[i] === 9)) i++
    if (i >= end || isSep(b[i]!)) fail('bad-vertex', 'vertex with fewer than 3 coordinates', line)
    const v = parseNumber(b, i, end)
    if (Number.isNaN(v)) fail('bad-number', 'unparsable coordinate', line)
    a[pos.n++] = v
    i = cursor.end
  }
  return i
}

/** Second results of `readFaceRefs`: reference count and the offset where reading stopped. */
const faceRefs = { n: 0, end: 0 }

/**
 * Reads the vertex references of an `f` line from i (after `f `) to the end of the line or a
 * comment: each `v`, `v/vt`, `v/vt/vn` or `v//vn`, 1-based or negative (relative to the `nv`
 * vertices read so far), stored 0-based in poly. Returns the count (also in `faceRefs.n`, with
 * the stop offset in `faceRefs.end`), or −1 when poly is too small.
 */
function readFaceRefs(b: Uint8Array, i: number, end: number, poly: Int32Array, nv: number, line: number): number {
  let n = 0
  for (;;) {
    let c = i < end ? b[i]! : 10
    while (c === 32 || c === 9 || c === 13) c = ++i < end ? b[i]! : 10
    if (c === 10 || c === 35 /* # */) break
    // state 1: the vertex index (optional sign, digits)
    const neg = c === 45
    if (neg || c === 43) i++
    let r = 0, nd = 0
    for (; i < end; i++) {
      const d = b[i]! - 48
      if (d < 0 || d > 9) break
      r = r * 10 + d
      nd++
    }
    c = i < end ? b[i]! : 10
    if (nd === 0 || nd > 16 || (c !== 47 /* / */ && !isSep(c))) fail('bad-face', 'unparsable vertex reference in face', line)
    // state 2: skip /vt/vn
    while (i < end && !isSep(b[i]!)) i++
    if (neg) r = nv - r
    else if (r === 0) fail('index-out-of-range', 'vertex index 0 in face (OBJ indices start at 1)', line)
    else r = r - 1
    if (r < 0 || r > 0xfffffffe) fail('index-out-of-range', 'vertex index out of range in face', line)
    if (n === poly.length) return -1
    poly[n++] = r
  }
  faceRefs.n = n
  faceRefs.end = i
  return n
}

/** Fan-triangulates the polygon poly[0..n) as (v0, vk, vk+1); every triangle maps to `face`. */
function addFan(poly: Int32Array, n: number, face: number, idx: U32Builder, src: U32Builder): void {
  const add = (n - 2) * 3
  if (idx.n + add > idx.a.length) idx.grow(idx.n + add)
  if (src.n + n - 2 > src.a.length) src.grow(src.n + n - 2)
  const a = idx.a, s = src.a
  const v0 = poly[0]!
  for (let k = 1; k + 1 < n; k++) {
    a[idx.n++] = v0; a[idx.n++] = poly[k]!; a[idx.n++] = poly[k + 1]!
    s[src.n++] = face
  }
}
