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
import type { TriMesh } from '../types'
import { GeometryError } from '../types'
import { readObj } from './obj'
import { readPly } from './ply'
import { latin1 } from './scan'

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
