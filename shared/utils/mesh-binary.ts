/**
 * Compact binary containers for meshes moving between the server, its workers and the viewer.
 *
 * Analysis mesh (`ISTHMF64`): the validated mesh in metres, float64 — what every computation reads.
 * Display mesh (`ISTHMF32`): a simplified float32 copy for the browser, positions relative to
 * `origin` (metres, float64) so float32 keeps sub-millimetre detail on kilometre-scale bodies.
 *
 * Layout (little endian): 8-byte magic, u32 vertexCount, u32 faceCount, then for F32 three f64
 * origin values, then positions, then u32 indices. Each array starts 8-byte aligned.
 */
export interface DisplayMesh {
  origin: [number, number, number]
  positions: Float32Array
  indices: Uint32Array
}

const MAGIC64 = 'ISTHMF64'
const MAGIC32 = 'ISTHMF32'

function writeMagic(view: DataView, magic: string) {
  for (let i = 0; i < 8; i++) view.setUint8(i, magic.charCodeAt(i))
}
function readMagic(view: DataView): string {
  let s = ''
  for (let i = 0; i < 8; i++) s += String.fromCharCode(view.getUint8(i))
  return s
}

export function encodeAnalysisMesh(positions: Float64Array, indices: Uint32Array): Uint8Array {
  const nv = positions.length / 3
  const nf = indices.length / 3
  const head = 16
  const out = new Uint8Array(head + positions.byteLength + indices.byteLength)
  const view = new DataView(out.buffer)
  writeMagic(view, MAGIC64)
  view.setUint32(8, nv, true)
  view.setUint32(12, nf, true)
  new Float64Array(out.buffer, head, positions.length).set(positions)
  new Uint32Array(out.buffer, head + positions.byteLength, indices.length).set(indices)
  return out
}

/** Decodes an analysis mesh; the arrays are copies aligned for typed-array use. */
export function decodeAnalysisMesh(bytes: Uint8Array): { positions: Float64Array, indices: Uint32Array } {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  if (bytes.byteLength < 16 || readMagic(view) !== MAGIC64) throw new Error('decodeAnalysisMesh: not an analysis mesh')
  const nv = view.getUint32(8, true)
  const nf = view.getUint32(12, true)
  if (bytes.byteLength !== 16 + nv * 24 + nf * 12) throw new Error('decodeAnalysisMesh: size does not match the header')
  const positions = new Float64Array(nv * 3)
  new Uint8Array(positions.buffer).set(bytes.subarray(16, 16 + nv * 24))
  const indices = new Uint32Array(nf * 3)
  new Uint8Array(indices.buffer).set(bytes.subarray(16 + nv * 24, 16 + nv * 24 + nf * 12))
  return { positions, indices }
}

export function encodeDisplayMesh(mesh: DisplayMesh): Uint8Array {
  const nv = mesh.positions.length / 3
  const nf = mesh.indices.length / 3
  const head = 40
  const posBytes = Math.ceil(mesh.positions.byteLength / 8) * 8
  const out = new Uint8Array(head + posBytes + mesh.indices.byteLength)
  const view = new DataView(out.buffer)
  writeMagic(view, MAGIC32)
  view.setUint32(8, nv, true)
  view.setUint32(12, nf, true)
  view.setFloat64(16, mesh.origin[0], true)
  view.setFloat64(24, mesh.origin[1], true)
  view.setFloat64(32, mesh.origin[2], true)
  new Float32Array(out.buffer, head, mesh.positions.length).set(mesh.positions)
  new Uint32Array(out.buffer, head + posBytes, mesh.indices.length).set(mesh.indices)
  return out
}

export function decodeDisplayMesh(buffer: ArrayBuffer): DisplayMesh {
  const view = new DataView(buffer)
  if (buffer.byteLength < 40 || readMagic(view) !== MAGIC32) throw new Error('decodeDisplayMesh: not a display mesh')
  const nv = view.getUint32(8, true)
  const nf = view.getUint32(12, true)
  const posBytes = Math.ceil((nv * 12) / 8) * 8
  if (buffer.byteLength !== 40 + posBytes + nf * 12) throw new Error('decodeDisplayMesh: size does not match the header')
  return {
    origin: [view.getFloat64(16, true), view.getFloat64(24, true), view.getFloat64(32, true)],
    positions: new Float32Array(buffer, 40, nv * 3),
    indices: new Uint32Array(buffer, 40 + posBytes, nf * 3),
  }
}
