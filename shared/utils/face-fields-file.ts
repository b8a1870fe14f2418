/**
 * Per-face surface fields of a lobe as one binary file (`ISTHFF01`), and streamed exports of it.
 *
 * Layout (little endian): 8-byte magic, u32 faceCount, u32 header length, the header (UTF-8 JSON:
 * units, conventions, error estimate...), padding to 8 bytes, then float64 arrays of faceCount
 * values in the order of `header.columns` (centroid x, y, z first). Rows are the faces of the
 * analysis mesh in its own order (face index = row).
 */

const MAGIC = 'ISTHFF01'

/**
 * Columns of the JSON answer: the field names the product has used since before (gravity, slopeDeg,
 * geopotentialHeight, potential = effective potential, escapeSpeed) and the new ones.
 */
export const FIELD_JSON_COLUMNS: (string | [string, string])[] = ['gravity', 'slopeDeg', 'geopotentialHeight', ['potential', 'effectivePotential'], 'escapeSpeed', 'gravitationalPotential', 'effectiveGravity', 'slopeNonRotatingDeg', 'escapeSpeedAlongRotation', 'centroidX', 'centroidY', 'centroidZ', 'area']

export interface FaceFieldsHeader {
  /** Column names in file order, each a float64 array of faceCount values. */
  columns: string[]
  /** Unit of each column. */
  units: Record<string, string>
  [key: string]: unknown
}

export interface FaceFieldsFile {
  faceCount: number
  header: FaceFieldsHeader
  column: (name: string) => Float64Array
}

export function encodeFaceFields(header: FaceFieldsHeader, columns: Record<string, Float64Array>): Uint8Array {
  const n = columns[header.columns[0]!]!.length
  const json = new TextEncoder().encode(JSON.stringify(header))
  const head = Math.ceil((16 + json.byteLength) / 8) * 8
  const out = new Uint8Array(head + 8 * n * header.columns.length)
  const view = new DataView(out.buffer)
  for (let i = 0; i < 8; i++) view.setUint8(i, MAGIC.charCodeAt(i))
  view.setUint32(8, n, true)
  view.setUint32(12, json.byteLength, true)
  out.set(json, 16)
  header.columns.forEach((name, k) => {
    const a = columns[name]
    if (!a || a.length !== n) throw new Error(`encodeFaceFields: column ${name} has ${a?.length ?? 0} values, expected ${n}`)
    new Float64Array(out.buffer, head + 8 * n * k, n).set(a)
  })
  return out
}

export function decodeFaceFields(bytes: Uint8Array): FaceFieldsFile {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  let magic = ''
  for (let i = 0; i < 8; i++) magic += String.fromCharCode(view.getUint8(i))
  if (magic !== MAGIC) throw new Error('decodeFaceFields: not a face-fields file')
  const n = view.getUint32(8, true), len = view.getUint32(12, true)
  const header = JSON.parse(new TextDecoder().decode(bytes.subarray(16, 16 + len))) as FaceFieldsHeader
  const head = Math.ceil((16 + len) / 8) * 8
  if (bytes.byteLength !== head + 8 * n * header.columns.length) throw new Error('decodeFaceFields: size does not match the header')
  // aligned copy once (the file's buffer offset may not be a multiple of 8)
  const data = new Float64Array(n * header.columns.length)
  new Uint8Array(data.buffer).set(bytes.subarray(head))
  return {
    faceCount: n,
    header,
    column: (name) => {
      const k = header.columns.indexOf(name)
      if (k < 0) throw new Error(`decodeFaceFields: no column ${name}`)
      return data.subarray(n * k, n * (k + 1))
    },
  }
}

/** Shortest decimal that reads back as the same float64 (JSON/CSV cells). */
const num = (v: number) => (Number.isFinite(v) ? String(v) : '')

/**
 * CSV of every face, in chunks of `rows` lines (a generator: a million-face export never becomes one
 * string). Comment lines (`# ...`) first state the conventions; then a header row
 * `face,centroid_x_m,...,<field>_<unit>`; face = 0-based index in the analysis mesh.
 */
export function* faceFieldsCsv(file: FaceFieldsFile, comments: string[], rows = 4096): Generator<string> {
  const cols = file.header.columns
  const unitTag = (u: string) => u.replace(/\^/g, '').replace(/\s+/g, '_')
  const names = cols.map(c => `${c}_${unitTag(file.header.units[c] ?? '1')}`)
  yield `${comments.map(c => `# ${c.replace(/[\r\n]+/g, ' ')}`).join('\r\n')}\r\nface,${names.join(',')}\r\n`
  const arrays = cols.map(c => file.column(c))
  for (let s = 0; s < file.faceCount; s += rows) {
    const e = Math.min(file.faceCount, s + rows)
    let out = ''
    for (let i = s; i < e; i++) {
      out += String(i)
      for (const a of arrays) out += `,${num(a[i]!)}`
      out += '\r\n'
    }
    yield out
  }
}

/**
 * Binary little-endian PLY (Turk 1994; the open PLY format) of the analysis mesh with every field
 * as a per-face `double` property, in chunks: the vertex element (double x, y, z, metres), then the
 * face element (uchar count, uint indices, then one double per field). `comments` become PLY
 * comment lines (conventions and units).
 */
export function* faceFieldsPly(positions: Float64Array, indices: Uint32Array, file: FaceFieldsFile, fields: string[], comments: string[], facesPerChunk = 16384): Generator<Uint8Array> {
  const nv = positions.length / 3, nf = indices.length / 3
  if (nf !== file.faceCount) throw new Error(`faceFieldsPly: the mesh has ${nf} faces, the fields ${file.faceCount}`)
  const clean = (s: string) => s.replace(/[\r\n]+/g, ' ')
  const header = ['ply', 'format binary_little_endian 1.0', ...comments.map(c => `comment ${clean(c)}`),
    `element vertex ${nv}`, 'property double x', 'property double y', 'property double z',
    `element face ${nf}`, 'property list uchar uint vertex_indices', ...fields.map(f => `property double ${f}`), 'end_header', ''].join('\n')
  yield new TextEncoder().encode(header)
  for (let s = 0; s < nv; s += 65536) {
    const e = Math.min(nv, s + 65536)
    const b = new Uint8Array(24 * (e - s))
    new Float64Array(b.buffer).set(positions.subarray(3 * s, 3 * e))
    yield b
  }
  const arrays = fields.map(f => file.column(f))
  const rec = 1 + 12 + 8 * fields.length
  for (let s = 0; s < nf; s += facesPerChunk) {
    const e = Math.min(nf, s + facesPerChunk)
    const b = new Uint8Array(rec * (e - s))
    const v = new DataView(b.buffer)
    for (let f = s, o = 0; f < e; f++, o += rec) {
      v.setUint8(o, 3)
      v.setUint32(o + 1, indices[3 * f]!, true); v.setUint32(o + 5, indices[3 * f + 1]!, true); v.setUint32(o + 9, indices[3 * f + 2]!, true)
      for (let k = 0; k < arrays.length; k++) v.setFloat64(o + 13 + 8 * k, arrays[k]![f]!, true)
    }
    yield b
  }
}

/**
 * JSON of every face's values, streamed: `{ ...meta, "<name>": [v0, v1, ...], ... }` (a column is
 * given by its name or as [name in the answer, column]). Numbers
 * are written as the shortest round-trip decimal; non-finite values as null.
 */
export function* faceFieldsJson(file: FaceFieldsFile, meta: Record<string, unknown>, columns: (string | [name: string, column: string])[], perChunk = 65536): Generator<string> {
  const head = JSON.stringify(meta)
  yield head.slice(0, -1)
  let sep = head.length > 2 ? ',' : ''
  for (const entry of columns) {
    const [name, c] = typeof entry === 'string' ? [entry, entry] : entry
    const a = file.column(c)
    yield `${sep}${JSON.stringify(name)}:[`
    sep = ','
    for (let s = 0; s < a.length; s += perChunk) {
      const e = Math.min(a.length, s + perChunk)
      let out = s > 0 ? ',' : ''
      for (let i = s; i < e; i++) out += (i > s ? ',' : '') + (Number.isFinite(a[i]!) ? String(a[i]) : 'null')
      yield out
    }
    yield ']'
  }
  yield '}'
}
