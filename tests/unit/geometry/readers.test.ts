import { describe, expect, it } from 'vitest'
import { OBJLoader } from 'three/examples/jsm/loaders/OBJLoader.js'
import { PLYLoader } from 'three/examples/jsm/loaders/PLYLoader.js'
import { boxMesh, FILE_FACE_NUMBERING, GeometryError, icosphere, massProperties, perturbedEllipsoid, readMesh, seededRandom, validateMesh, writeObj, writePly } from '#shared/geometry'
import { close, closeMat, closeVec } from './helpers'

const enc = (s: string) => new TextEncoder().encode(s)
const code = (f: () => unknown): string => {
  try { f() } catch (e) { if (e instanceof GeometryError) return e.code; throw e }
  return 'no-error'
}

describe('OBJ reader', () => {
  it('reads v/f with vt/vn references, negative indices, comments, groups, CRLF; fan-triangulates quads', () => {
    const text = [
      '# cube', 'mtllib x.mtl', 'o cube', 'g g1', 's off', 'usemtl m',
      'v -0.5 -0.5 -0.5', 'v 0.5 -0.5 -0.5', 'v -0.5 0.5 -0.5', 'v 0.5 0.5 -0.5',
      'v -0.5 -0.5 0.5', 'v 0.5 -0.5 0.5   # trailing comment', 'v -0.5 0.5 0.5', 'v 0.5 0.5 0.5 1.0',
      'vt 0 0', 'vn 0 0 1',
      'f 1/1/1 3/1/1 4/1/1 2/1/1', 'f 5//1 6//1 8//1 7//1', 'f 1/1 2/1 6/1 5/1', 'f -6 -2 -1 -5', 'f 1 5 7 3', 'f 2 4 8 6',
    ].join('\r\n')
    const r = readMesh(enc(text))
    expect(r.format).toBe('obj')
    expect(r.sourceFaceCount).toBe(6)
    expect(r.triangulatedPolygons).toBe(6)
    expect(r.mesh.indices.length).toBe(36)
    const { mesh } = validateMesh(r.mesh)
    close(massProperties(mesh, { density: 1 }).volume, 1, 1e-14)
  })
  it('parses coordinates exactly as Number() (round trip of shortest decimal strings)', () => {
    const m = perturbedEllipsoid(3e3, 2e3, 1e3, 3, 4, 0.3)
    const r = readMesh(writeObj(m))
    expect(r.mesh.positions).toEqual(m.positions)
    const odd = ['1e-300', '-0', '123456789012345678901234', '0.1e+2', '.5', '5.', '+7', '1E5', '4.9e-324', 'Infinity']
    const t = readMesh(enc(odd.map(s => `v ${s} ${s} ${s}`).join('\n') + '\nf 1 2 3\n'))
    odd.forEach((s, i) => expect(Object.is(t.mesh.positions[3 * i], Number(s))).toBe(true))
  })
  it('refuses hexadecimal and binary numbers (which Number() would read as 16 and 1), naming the line', () => {
    for (const bad of ['0x10', '0b1', '0o7']) {
      const text = ['v 0 0 0', `v 1 ${bad} 0`, 'v 0 1 0', 'f 1 2 3'].join('\n')
      let error: unknown
      try { readMesh(enc(text)) }
      catch (e) { error = e }
      expect(error, bad).toBeInstanceOf(GeometryError)
      expect((error as GeometryError).code).toBe('bad-number')
      expect((error as GeometryError).issues[0]!.path).toBe('line[2]')
    }
  })
})

describe('PLY reader', () => {
  const m = perturbedEllipsoid(3, 2, 1, 3, 8, 0.2)
  const ref = massProperties(validateMesh(readMesh(writeObj(m)).mesh).mesh, { density: 1000 })
  for (const encoding of ['ascii', 'binary_little_endian', 'binary_big_endian'] as const) {
    for (const double of [false, true]) {
      it(`${encoding} ${double ? 'double' : 'float'} gives the same properties as OBJ`, () => {
        const r = readMesh(writePly(m, encoding, { double }))
        expect(r.format).toBe('ply')
        const p = massProperties(validateMesh(r.mesh).mesh, { density: 1000 })
        const rtol = double ? 1e-14 : 1e-6 // float32 coordinates
        close(p.volume, ref.volume, rtol)
        closeVec(p.principalMoments, ref.principalMoments, 10 * rtol)
        close(p.J2, ref.J2, 100 * rtol)
      })
    }
  }
  it('handles extra properties in any order, other elements with lists, vertex_index, int types, CRLF, comments', () => {
    const b = boxMesh(1, 1, 1)
    const lines = ['ply', 'format ascii 1.0', 'comment made by hand', 'obj_info x', 'element material 1', 'property list uchar int ids',
      'element vertex 8', 'property uchar red', 'property float z', 'property double nx', 'property int y', 'property float x',
      'element face 12', 'property uchar flags', 'property list ushort short vertex_index', 'element edge 1', 'property int a', 'property int b', 'end_header',
      '3 1 2 3 # a material']
    for (let v = 0; v < 8; v++) lines.push(`255 ${b.positions[3 * v + 2]} 0.5 ${b.positions[3 * v + 1]! * 2} ${b.positions[3 * v]}`)
    for (let f = 0; f < 12; f++) lines.push(`7 3 ${b.indices[3 * f]} ${b.indices[3 * f + 1]} ${b.indices[3 * f + 2]}`)
    lines.push('0 1', '')
    const r = readMesh(enc(lines.join('\r\n')))
    expect(r.mesh.positions[1]).toBe(-1) // y scaled ×2 as an int column
    expect(r.mesh.indices).toEqual(b.indices)
  })
  it('binary with extra elements and list properties before/after is skipped correctly', () => {
    const b = boxMesh(2, 2, 2)
    const header = 'ply\nformat binary_big_endian 1.0\nelement junk 2\nproperty list uchar double vals\nproperty short s\nelement vertex 8\nproperty double x\nproperty uchar q\nproperty double y\nproperty double z\nelement face 12\nproperty list int uint vertex_indices\nproperty float w\nelement tail 1\nproperty list uchar uchar t\nend_header\n'
    const h = enc(header)
    const body = new DataView(new ArrayBuffer(2 * (1 + 16 + 2) + 8 * 25 + 12 * 20 + 3))
    let o = 0
    for (let k = 0; k < 2; k++) { body.setUint8(o, 2); o++; body.setFloat64(o, 1); o += 8; body.setFloat64(o, 2); o += 8; body.setInt16(o, 3); o += 2 }
    for (let v = 0; v < 8; v++) { body.setFloat64(o, b.positions[3 * v]!); o += 8; body.setUint8(o, 9); o++; body.setFloat64(o, b.positions[3 * v + 1]!); o += 8; body.setFloat64(o, b.positions[3 * v + 2]!); o += 8 }
    for (let f = 0; f < 12; f++) { body.setInt32(o, 3); o += 4; for (let c = 0; c < 3; c++) { body.setUint32(o, b.indices[3 * f + c]!); o += 4 } body.setFloat32(o, 1); o += 4 }
    body.setUint8(o, 2); o++; body.setUint8(o, 1); o++; body.setUint8(o, 1); o++
    const bytes = new Uint8Array(h.length + o)
    bytes.set(h); bytes.set(new Uint8Array(body.buffer, 0, o), h.length)
    const r = readMesh(bytes)
    expect(r.mesh.positions).toEqual(b.positions)
    expect(r.mesh.indices).toEqual(b.indices)
  })
})

describe('cross-check with three.js loaders (OBJLoader, PLYLoader)', () => {
  const m = icosphere(2, 1.5)
  it('OBJLoader gives the same triangles (unindexed)', () => {
    const bytes = writeObj(m)
    const obj = new OBJLoader().parse(new TextDecoder().decode(bytes))
    let pos: ArrayLike<number> = []
    obj.traverse((c) => { const g = (c as unknown as { geometry?: { attributes: { position: { array: ArrayLike<number> } } } }).geometry; if (g) pos = g.attributes.position.array })
    const r = readMesh(bytes).mesh
    expect(pos.length).toBe(r.indices.length * 3)
    for (let i = 0; i < r.indices.length; i++) for (let d = 0; d < 3; d++) close(pos[3 * i + d]!, r.positions[3 * r.indices[i]! + d]!, 1e-6, 1e-7)
  })
  it('PLYLoader gives the same vertices and index', () => {
    const bytes = writePly(m, 'binary_little_endian')
    const g = new PLYLoader().parse(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer)
    const r = readMesh(bytes).mesh
    expect(Array.from(g.index!.array)).toEqual(Array.from(r.indices))
    expect(Array.from(g.attributes.position!.array)).toEqual(Array.from(r.positions))
  })
})

describe('bad input → GeometryError codes', () => {
  const ply = (h: string, body = '') => enc(`ply\nformat ascii 1.0\n${h}end_header\n${body}`)
  it.each([
    ['empty-file', () => readMesh(new Uint8Array(0))],
    ['empty-file', () => readMesh(enc('  \n\n'))],
    ['unknown-format', () => readMesh(Uint8Array.from([0, 1, 2, 3, 200, 17]))],
    ['unknown-format', () => readMesh(enc('hello world\n'))],
    ['empty-mesh', () => readMesh(enc('# nothing\nv 1 2 3\n'))],
    ['bad-vertex', () => readMesh(enc('v 1 2\nf 1 1 1\n'))],
    ['bad-number', () => readMesh(enc('v 1 abc 3\n'))],
    ['bad-face', () => readMesh(enc('v 1 2 3\nv 1 2 4\nf 1 2\n'))],
    ['index-out-of-range', () => readMesh(enc('v 1 2 3\nv 1 2 4\nv 0 0 0\nf 1 2 9\n'))],
    ['index-out-of-range', () => readMesh(enc('v 1 2 3\nf 0 1 1\n'))],
    ['too-large', () => readMesh(writeObj(boxMesh(1, 1, 1)), { maxVertices: 4 })],
    ['bad-header', () => readMesh(enc('ply\nformat binary_middle_endian 1.0\nend_header\n'))],
    ['bad-header', () => readMesh(ply('element vertex 1\nproperty float x\n', '1\n'))],
    ['bad-header', () => readMesh(ply('element vertex 3\nproperty float x\nproperty float y\nproperty float z\nelement face 1\nproperty list uchar float vertex_indices\n'))],
    ['truncated', () => readMesh(enc('ply\nformat ascii 1.0\nelement vertex 3\n'))],
    ['truncated', () => readMesh(enc('ply\nformat binary_little_endian 1.0\nelement vertex 4000000000\nproperty float x\nproperty float y\nproperty float z\nelement face 1\nproperty list uchar int vertex_indices\nend_header\n\u0000\u0000'), { maxVertices: 5e9 })],
    ['too-large', () => readMesh(enc('ply\nformat binary_little_endian 1.0\nelement vertex 4000000000\nproperty float x\nproperty float y\nproperty float z\nelement face 1\nproperty list uchar int vertex_indices\nend_header\n'))],
    ['truncated', () => readMesh(writePly(boxMesh(1, 1, 1), 'binary_little_endian').slice(0, 300))],
    ['truncated', () => readMesh(ply('element vertex 3\nproperty float x\nproperty float y\nproperty float z\nelement face 1\nproperty list uchar int vertex_indices\n', '0 0 0\n1 0 0\n0 1 0\n'))],
    ['count-mismatch', () => readMesh(ply('element vertex 3\nproperty float x\nproperty float y\nproperty float z\nelement face 1\nproperty list uchar int vertex_indices\n', '0 0 0 9\n1 0 0\n0 1 0\n3 0 1 2\n'))],
    ['count-mismatch', () => readMesh(ply('element vertex 3\nproperty float x\nproperty float y\nproperty float z\nelement face 1\nproperty list uchar int vertex_indices\n', '0 0 0\n1 0 0\n0 1 0\n3 0 1 2\n5 5 5\n'))],
  ])('%s', (expected, f) => {
    expect(code(f)).toBe(expected)
  })
  it('an absurd declared count fails fast without allocating', () => {
    const t = performance.now()
    const rss = process.memoryUsage().rss
    expect(code(() => readMesh(enc('ply\nformat binary_little_endian 1.0\nelement vertex 4000000000\nproperty double x\nproperty double y\nproperty double z\nelement face 4000000000\nproperty list uchar int vertex_indices\nend_header\nxx'), { maxVertices: 1e10, maxFaces: 1e10 }))).toBe('truncated')
    expect(performance.now() - t).toBeLessThan(50)
    expect(process.memoryUsage().rss - rss).toBeLessThan(50e6)
  })
})

describe('messages name faces as the file numbers them (triangle → file face map)', () => {
  const fail = (f: () => unknown): GeometryError => {
    try { f() } catch (e) { if (e instanceof GeometryError) return e; throw e }
    throw new Error('no error')
  }
  // Unit cube as six quads; faces in file order: 0 bottom, 1 top, 2 y=0, 3 y=1, 4 x=0, 5 x=1.
  const V = 'v 0 0 0\nv 1 0 0\nv 0 1 0\nv 1 1 0\nv 0 0 1\nv 1 0 1\nv 0 1 1\nv 1 1 1\n'
  const Q = ['1 3 4 2', '5 6 8 7', '1 2 6 5', '3 7 8 4', '1 5 7 3', '2 4 8 6']
  it('fan-triangulated polygons keep their file face number (OBJ and PLY, typed array)', () => {
    const r = readMesh(enc(V + Q.map(q => `f ${q}\n`).join('')))
    expect(r.mesh.sourceFace).toBeInstanceOf(Uint32Array)
    expect(Array.from(r.mesh.sourceFace!)).toEqual([0, 0, 1, 1, 2, 2, 3, 3, 4, 4, 5, 5])
    const ply = enc(`ply\nformat ascii 1.0\nelement vertex 8\nproperty float x\nproperty float y\nproperty float z\nelement face 3\nproperty list uchar int vertex_indices\nend_header\n${V.replace(/v /g, '')}3 0 2 3\n4 4 5 7 6\n5 0 1 5 4 2\n`)
    expect(Array.from(readMesh(ply).mesh.sourceFace!)).toEqual([0, 1, 1, 2, 2, 2])
    const bin = readMesh(writePly(boxMesh(1, 1, 1), 'binary_little_endian'))
    expect(Array.from(bin.mesh.sourceFace!)).toEqual(Array.from({ length: 12 }, (_, i) => i))
  })
  it('an open box of five quads is reported by its four side faces, not by triangle numbers', () => {
    // Without the top face (file face 1) the boundary is the top rim, whose four edges belong to
    // the four side quads; in the file without the top they are faces 1, 2, 3, 4 (geometry of a
    // cube, common practice, no source).
    const file = V + Q.filter((_, i) => i !== 1).map(q => `f ${q}\n`).join('')
    const e = fail(() => validateMesh(readMesh(enc(file)).mesh))
    expect(e.code).toBe('open-mesh')
    expect(new Set(e.issues.map(i => i.path))).toEqual(new Set(['faces[1]', 'faces[2]', 'faces[3]', 'faces[4]']))
    expect(e.message).toContain(FILE_FACE_NUMBERING)
    expect(e.message).toMatch(/first faces: [1-4], [1-4], [1-4], [1-4] \(/)
  })
  it('an out-of-range index names the file face (PLY quad)', () => {
    const ply = enc(`ply\nformat ascii 1.0\nelement vertex 4\nproperty float x\nproperty float y\nproperty float z\nelement face 2\nproperty list uchar int vertex_indices\nend_header\n0 0 0\n1 0 0\n0 1 0\n0 0 1\n3 0 1 2\n4 0 1 3 9\n`)
    const e = fail(() => readMesh(ply))
    expect(e.code).toBe('index-out-of-range')
    expect(e.issues.map(i => i.path)).toEqual(['faces[1]'])
    expect(e.message).toContain(FILE_FACE_NUMBERING)
  })
  it('PLY header errors say what is wrong with which word', () => {
    const e = fail(() => readMesh(enc('ply\nformat ascii 1.0\nelement vertex eight\nproperty float x\nend_header\n0 0 0\n')))
    expect(e.code).toBe('bad-header')
    expect(e.message).toBe('readPly: element vertex count "eight" is not a whole number (header line 3)')
    expect(fail(() => readMesh(enc('ply\nformat ascii 1.0\nelement vertex 3\nproperty flot x\nend_header\n'))).message).toMatch(/unknown property type "flot"/)
    // user text is reduced to letters, digits, _ and - before it is quoted
    expect(fail(() => readMesh(enc('ply\nformat ascii 1.0\nelement vertex <b>\nend_header\n'))).message).toMatch(/count "\?b\?" is not/)
  })
})

describe('fuzz: ~2000 seeded mutations only ever return or throw GeometryError', () => {
  it('byte flips, truncations, header edits on OBJ and PLY (all encodings)', () => {
    const m = icosphere(1)
    const seeds = [writeObj(m), writePly(m, 'ascii'), writePly(m, 'binary_little_endian'), writePly(m, 'binary_big_endian', { double: true })]
    const rnd = seededRandom(2024)
    const headerEdits: [string, string][] = [['vertex 42', 'vertex 4294967295'], ['face 80', 'face 81'], ['uchar', 'float'], ['float', 'int'], ['end_header', 'end_headr'], ['vertex_indices', 'vi'], ['1.0', '2.0'], ['x', 'w']]
    let ok = 0, rejected = 0
    const t0 = performance.now()
    for (let it = 0; it < 2000; it++) {
      let b = seeds[it % seeds.length]!.slice()
      const kind = Math.floor(rnd() * 4)
      if (kind === 0) { const n = 1 + Math.floor(rnd() * 8); for (let k = 0; k < n; k++) b[Math.floor(rnd() * b.length)] = Math.floor(rnd() * 256) }
      else if (kind === 1) b = b.slice(0, Math.floor(rnd() * b.length))
      else if (kind === 2) {
        const [a, c] = headerEdits[Math.floor(rnd() * headerEdits.length)]!
        const head = new TextDecoder('latin1').decode(b.slice(0, 400))
        const i = head.indexOf(a)
        if (i >= 0) { const nb = new Uint8Array(b.length - a.length + c.length); nb.set(b.slice(0, i)); nb.set(enc(c), i); nb.set(b.slice(i + a.length), i + c.length); b = nb }
      } else { const i = Math.floor(rnd() * b.length); b = Uint8Array.from([...b.slice(0, i), ...enc(['-', '.', 'e', '/', '#', '\n', ' ', '9999999999'][Math.floor(rnd() * 8)]!), ...b.slice(i)]) }
      try {
        const r = readMesh(b)
        try { validateMesh(r.mesh, { selfIntersectionMaxFaces: 0 }); ok++ } catch (e) { if (!(e instanceof GeometryError)) throw e; rejected++ }
      } catch (e) {
        if (!(e instanceof GeometryError)) throw new Error(`iteration ${it}: non-GeometryError ${String(e)}`)
        rejected++
      }
    }
    expect(ok + rejected).toBe(2000)
    expect(performance.now() - t0).toBeLessThan(20_000)
  })
})

describe('every reader variant parses to the same properties', () => {
  it('OBJ with quads = OBJ with triangles = PLY ascii (box)', () => {
    const quads = 'v 0 0 0\nv 1 0 0\nv 0 1 0\nv 1 1 0\nv 0 0 1\nv 1 0 1\nv 0 1 1\nv 1 1 1\nf 1 3 4 2\nf 5 6 8 7\nf 1 2 6 5\nf 3 7 8 4\nf 1 5 7 3\nf 2 4 8 6\n'
    const a = massProperties(validateMesh(readMesh(enc(quads)).mesh).mesh, { density: 3 })
    const b = massProperties(validateMesh(readMesh(writePly(boxMesh(1, 1, 1, [0.5, 0.5, 0.5]), 'ascii', { double: true })).mesh).mesh, { density: 3 })
    close(a.mass, b.mass, 1e-14)
    closeMat(a.inertia, b.inertia, 1e-13, 1e-15)
  })
})
