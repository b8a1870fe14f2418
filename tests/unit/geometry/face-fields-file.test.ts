import { describe, expect, it } from 'vitest'
import { readMesh } from '#shared/geometry'
import { decodeFaceFields, encodeFaceFields, faceFieldsCsv, faceFieldsJson, faceFieldsPly } from '#shared/utils/face-fields-file'

// Round trips through the general-purpose readers: JSON.parse, the PLY reader of the core (open PLY format, Turk 1994).
describe('per-face fields file and its streamed exports', () => {
  const positions = Float64Array.from([0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0, 1])
  const indices = Uint32Array.from([0, 2, 1, 0, 1, 3, 0, 3, 2, 1, 2, 3])
  const cols = { centroidX: Float64Array.from([0.1, 0.2, 0.3, 0.4]), gravity: Float64Array.from([1e-3, 2e-3, Math.PI, 1 / 3]) }
  const file = decodeFaceFields(encodeFaceFields({ columns: ['centroidX', 'gravity'], units: { centroidX: 'm', gravity: 'm s^-2' }, note: 'x' }, cols))
  it('decodes what it encodes, header included', () => {
    expect(file.faceCount).toBe(4)
    expect(file.header.note).toBe('x')
    expect(Array.from(file.column('gravity'))).toEqual(Array.from(cols.gravity))
  })
  it('JSON in chunks parses to the same numbers (shortest round-trip decimals)', () => {
    const text = [...faceFieldsJson(file, { lobeId: 3 }, ['gravity', ['x', 'centroidX']], 3)].join('')
    const j = JSON.parse(text)
    expect(j.lobeId).toBe(3)
    expect(j.gravity).toEqual(Array.from(cols.gravity))
    expect(j.x).toEqual(Array.from(cols.centroidX))
  })
  it('CSV: comments, a header with units, one row per face in chunks', () => {
    const text = [...faceFieldsCsv(file, ['units: SI', 'two\nlines'], 3)].join('')
    const lines = text.trim().split('\r\n')
    expect(lines.slice(0, 2)).toEqual(['# units: SI', '# two lines'])
    expect(lines[2]).toBe('face,centroidX_m,gravity_m_s-2')
    expect(lines.length).toBe(7)
    expect(Number(lines[5]!.split(',')[2])).toBe(Math.PI)
  })
  it('PLY: the core reader reads back the mesh of the binary export', () => {
    const chunks = [...faceFieldsPly(positions, indices, file, ['gravity'], ['fields in SI units'], 3)]
    const bytes = new Uint8Array(chunks.reduce((n, c) => n + c.byteLength, 0))
    let o = 0
    for (const c of chunks) { bytes.set(c, o); o += c.byteLength }
    expect(new TextDecoder().decode(bytes.subarray(0, 400))).toMatch(/property double gravity\nend_header/)
    const mesh = readMesh(bytes).mesh
    expect(Array.from(mesh.positions)).toEqual(Array.from(positions))
    expect(Array.from(mesh.indices)).toEqual(Array.from(indices))
  })
})
