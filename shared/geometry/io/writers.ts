/**
 * Mesh writers: Wavefront OBJ and Stanford PLY (ascii, binary little/big endian).
 * Coordinates are written in the mesh's units (metres). ASCII output uses JavaScript's shortest
 * round-trip number formatting, so reading the file back gives the same float64 values bit for bit.
 * Binary PLY with `double: false` (the default) stores float32 coordinates (rounded).
 */
import type { TriMesh } from '../types'

const CHUNK = 1 << 20

/** Concatenate encoded string chunks into one Uint8Array. */
function joinChunks(parts: Uint8Array[]): Uint8Array {
  let n = 0
  for (const p of parts) n += p.length
  const out = new Uint8Array(n)
  let o = 0
  for (const p of parts) { out.set(p, o); o += p.length }
  return out
}

/** Wavefront OBJ: one `v x y z` line per vertex, one `f i j k` line (1-based) per triangle. */
export function writeObj(mesh: TriMesh, opts: { comment?: string } = {}): Uint8Array {
  const enc = new TextEncoder()
  const parts: Uint8Array[] = []
  const p = mesh.positions
  const ix = mesh.indices
  let s = `# Isthmus OBJ${opts.comment ? ' ' + opts.comment.replace(/[\r\n]/g, ' ') : ''}\n# vertices ${p.length / 3} faces ${ix.length / 3}\n`
  for (let i = 0; i < p.length; i += 3) {
    s += 'v ' + p[i] + ' ' + p[i + 1] + ' ' + p[i + 2] + '\n'
    if (s.length > CHUNK) { parts.push(enc.encode(s)); s = '' }
  }
  for (let i = 0; i < ix.length; i += 3) {
    s += 'f ' + (ix[i]! + 1) + ' ' + (ix[i + 1]! + 1) + ' ' + (ix[i + 2]! + 1) + '\n'
    if (s.length > CHUNK) { parts.push(enc.encode(s)); s = '' }
  }
  parts.push(enc.encode(s))
  return joinChunks(parts)
}

export type PlyEncoding = 'ascii' | 'binary_little_endian' | 'binary_big_endian'

/**
 * Stanford PLY with `element vertex` (x, y, z as float or double) and `element face`
 * (`property list uchar uint vertex_indices`).
 * @param opts.double write coordinates as 64-bit `double` (default false: 32-bit `float`).
 */
export function writePly(mesh: TriMesh, encoding: PlyEncoding = 'binary_little_endian', opts: { double?: boolean } = {}): Uint8Array {
  const nv = mesh.positions.length / 3
  const nf = mesh.indices.length / 3
  const t = opts.double ? 'double' : 'float'
  const header = `ply\nformat ${encoding} 1.0\ncomment Isthmus\nelement vertex ${nv}\nproperty ${t} x\nproperty ${t} y\nproperty ${t} z\nelement face ${nf}\nproperty list uchar uint vertex_indices\nend_header\n`
  const enc = new TextEncoder()
  const p = mesh.positions
  const ix = mesh.indices
  if (encoding === 'ascii') {
    const parts: Uint8Array[] = [enc.encode(header)]
    let s = ''
    for (let i = 0; i < p.length; i += 3) {
      // float coordinates: round through float32 so that ascii and binary float files agree
      if (opts.double) s += p[i] + ' ' + p[i + 1] + ' ' + p[i + 2] + '\n'
      else s += Math.fround(p[i]!) + ' ' + Math.fround(p[i + 1]!) + ' ' + Math.fround(p[i + 2]!) + '\n'
      if (s.length > CHUNK) { parts.push(enc.encode(s)); s = '' }
    }
    for (let i = 0; i < ix.length; i += 3) {
      s += '3 ' + ix[i] + ' ' + ix[i + 1] + ' ' + ix[i + 2] + '\n'
      if (s.length > CHUNK) { parts.push(enc.encode(s)); s = '' }
    }
    parts.push(enc.encode(s))
    return joinChunks(parts)
  }
  const le = encoding === 'binary_little_endian'
  const h = enc.encode(header)
  const cs = opts.double ? 8 : 4
  const out = new Uint8Array(h.length + nv * 3 * cs + nf * 13)
  out.set(h)
  const dv = new DataView(out.buffer)
  let o = h.length
  if (opts.double) {
    for (let i = 0; i < p.length; i++, o += 8) dv.setFloat64(o, p[i]!, le)
  } else {
    for (let i = 0; i < p.length; i++, o += 4) dv.setFloat32(o, p[i]!, le)
  }
  for (let i = 0; i < ix.length; i += 3) {
    out[o] = 3
    dv.setUint32(o + 1, ix[i]!, le)
    dv.setUint32(o + 5, ix[i + 1]!, le)
    dv.setUint32(o + 9, ix[i + 2]!, le)
    o += 13
  }
  return out
}
