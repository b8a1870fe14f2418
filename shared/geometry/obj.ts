/**
 * Wavefront OBJ reader (geometry only): `v x y z [w | r g b]` and `f` lines with `v`, `v/vt`,
 * `v/vt/vn`, `v//vn` references, 1-based or negative (relative) indices; polygons fan-triangulated.
 * Comments (`#`, also at line ends), blank lines, CRLF and every other statement (o, g, s, usemtl,
 * mtllib, vt, vn, l, p, ...) are ignored. Line continuation (`\`) is not supported.
 */
import { GeometryError } from './types'
import type { TriMesh } from './types'
import { F64Builder, U32Builder, checkIndexRange, isSep, parseInteger, parseNumber, cursor } from './readers'

export interface ObjLimits { maxVertices: number, maxFaces: number }

function fail(code: string, what: string, line: number): never {
  throw new GeometryError(code, `readObj: ${what} at line ${line}`, [{ path: `line[${line}]`, message: what }])
}

/** Parse OBJ bytes. See `readMesh` for the errors. */
export function readObj(b: Uint8Array, limits: ObjLimits): { mesh: TriMesh, sourceFaceCount: number, triangulatedPolygons: number } {
  const end = b.length
  // rough initial capacities from the file size (≈ 28 bytes per vertex line, 2 faces per vertex)
  const est = Math.min(Math.ceil(end / 60) + 16, 1 << 24)
  const pos = new F64Builder(est * 3)
  const idx = new U32Builder(est * 6)
  const src = new U32Builder(est * 2) // triangle → face number in the file (from 0)
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
      i += 2
      if (nv >= limits.maxVertices) throw new GeometryError('too-large', `readObj: more than ${limits.maxVertices} vertices`)
      if (pos.n + 3 > pos.a.length) pos.grow(pos.n + 3)
      const a = pos.a
      for (let k = 0; k < 3; k++) {
        while (i < end && (b[i] === 32 || b[i] === 9)) i++
        if (i >= end || isSep(b[i]!)) fail('bad-vertex', 'vertex with fewer than 3 coordinates', line)
        const v = parseNumber(b, i, end)
        if (Number.isNaN(v)) fail('bad-number', 'unparsable coordinate', line)
        a[pos.n++] = v
        i = cursor.end
      }
      nv++
    } else if (c === 102 /* f */ && (next === 32 || next === 9)) {
      i += 2
      let n = 0
      for (;;) {
        while (i < end && (b[i] === 32 || b[i] === 9 || b[i] === 13)) i++
        if (i >= end || b[i] === 10 || b[i] === 35) break
        let r = parseInteger(b, i, end)
        i = cursor.end
        if (Number.isNaN(r) || (i < end && b[i] !== 47 /* / */ && !isSep(b[i]!))) fail('bad-face', 'unparsable vertex reference in face', line)
        // skip /vt/vn
        while (i < end && !isSep(b[i]!)) i++
        if (r < 0) r = nv + r
        else if (r === 0) fail('index-out-of-range', 'vertex index 0 in face (OBJ indices start at 1)', line)
        else r = r - 1
        if (r < 0 || r > 0xfffffffe) fail('index-out-of-range', 'vertex index out of range in face', line)
        if (n === poly.length) { const p2 = new Int32Array(n * 2); p2.set(poly); poly = p2 }
        poly[n++] = r
      }
      if (n < 3) fail('bad-face', `face with ${n} vertices (at least 3 needed)`, line)
      const face = sourceFaces
      sourceFaces++
      if (n > 3) triangulated++
      const add = (n - 2) * 3
      if ((idx.n + add) / 3 > limits.maxFaces) throw new GeometryError('too-large', `readObj: more than ${limits.maxFaces} triangles`)
      if (idx.n + add > idx.a.length) idx.grow(idx.n + add)
      if (src.n + n - 2 > src.a.length) src.grow(src.n + n - 2)
      const a = idx.a
      const v0 = poly[0]!
      for (let k = 1; k + 1 < n; k++) {
        a[idx.n++] = v0; a[idx.n++] = poly[k]!; a[idx.n++] = poly[k + 1]!
        src.a[src.n++] = face
      }
    }
    // to the end of the line (rest of a v line: w or colours; comments; other statements)
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
