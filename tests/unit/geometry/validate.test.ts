import { describe, expect, it } from 'vitest'
import { boxMesh, closedOrientedManifold, faceComponents, GeometryError, icosphere, massProperties, mergeMeshes, seededRandom, validateMesh } from '#shared/geometry'
import type { TriMesh } from '#shared/geometry'
import { close } from './helpers'

const err = (m: TriMesh): GeometryError => {
  try { validateMesh(m) } catch (e) { if (e instanceof GeometryError) return e; throw e }
  throw new Error('no error')
}
const flipAll = (m: TriMesh): TriMesh => {
  const i = m.indices.slice()
  for (let f = 0; f < i.length; f += 3) { const t = i[f + 1]!; i[f + 1] = i[f + 2]!; i[f + 2] = t }
  return { positions: m.positions, indices: i }
}
function tet(o: number[], s = 1): TriMesh {
  const p = [0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0, 1].map((v, k) => v * s + o[k % 3]!)
  return { positions: Float64Array.from(p), indices: Uint32Array.from([0, 2, 1, 0, 1, 3, 0, 3, 2, 1, 2, 3]) }
}

describe('validateMesh repairs', () => {
  it('inside-out mesh is reversed with a warning', () => {
    const { mesh, report } = validateMesh(flipAll(boxMesh(1, 2, 3)))
    expect(report.invertedOrientation).toBe(true)
    expect(report.warnings.map(w => w.code)).toContain('inverted-orientation')
    close(massProperties(mesh, { density: 1 }).volume, 6, 1e-14)
  })
  it('inconsistent winding is fixed by BFS reorientation', () => {
    const m = icosphere(3)
    const idx = m.indices.slice()
    const rnd = seededRandom(3)
    const flipped = new Set<number>()
    while (flipped.size < 40) flipped.add(Math.floor(rnd() * 1280))
    for (const f of flipped) { const t = idx[3 * f + 1]!; idx[3 * f + 1] = idx[3 * f + 2]!; idx[3 * f + 2] = t }
    const { report } = validateMesh({ positions: m.positions, indices: idx })
    expect(report.flippedFaces).toBe(40)
    close(report.volume, validateMesh(m).report.volume, 1e-14)
  })
  it('a triangle soup (every face with its own vertices) is welded', () => {
    const b = boxMesh(1, 1, 1)
    const positions = new Float64Array(36 * 3)
    for (let i = 0; i < 36; i++) for (let d = 0; d < 3; d++) positions[3 * i + d] = b.positions[3 * b.indices[i]! + d]! + (i % 2 ? 1e-12 : 0)
    const { report } = validateMesh({ positions, indices: Uint32Array.from({ length: 36 }, (_, i) => i) })
    expect(report.vertexCount).toBe(8)
    expect(report.weldedVertices).toBe(28)
  })
  it('collapsed faces are dropped with a warning when the mesh stays closed; unused vertices removed', () => {
    const b = boxMesh(1, 1, 1)
    const positions = new Float64Array([...b.positions, 9, 9, 9])
    const { report } = validateMesh({ positions, indices: Uint32Array.from([...b.indices, 0, 0, 1]) })
    expect(report.degenerateFaces).toBe(1)
    expect(report.unreferencedVertices).toBe(1)
    expect(report.faceCount).toBe(12)
  })
  it('several components are accepted and listed; self-intersections are found (three-mesh-bvh)', () => {
    const { report } = validateMesh(mergeMeshes([boxMesh(1, 1, 1), boxMesh(1, 1, 1, [0.5, 0.3, 0.2]), boxMesh(1, 1, 1, [5, 0, 0])]))
    expect(report.components).toBe(3)
    expect(report.componentFaceCounts).toEqual([12, 12, 12])
    expect(report.selfIntersections.checked).toBe(true)
    expect(report.selfIntersections.count).toBeGreaterThan(0)
    expect(validateMesh(icosphere(3)).report.selfIntersections.count).toBe(0)
    expect(validateMesh(icosphere(3), { selfIntersectionMaxFaces: 100 }).report.selfIntersections.checked).toBe(false)
  })
})

describe('validateMesh rejects with codes, counts and face indices', () => {
  it('non-finite', () => {
    const b = boxMesh(1, 1, 1); b.positions[4] = Number.NaN
    const e = err(b)
    expect(e.code).toBe('non-finite')
    expect(e.issues[0]!.path).toBe('vertices[1]')
  })
  it('index-out-of-range', () => {
    const b = boxMesh(1, 1, 1); b.indices[17] = 99
    const e = err(b)
    expect(e.code).toBe('index-out-of-range')
    expect(e.issues[0]!.path).toBe('faces[5]')
    expect(e.message).toMatch(/first triangles: 5 \(triangles numbered from 0\)/)
  })
  it('with a triangle → file face map, faces are named by the file numbering', () => {
    const b = boxMesh(1, 1, 1)
    // twelve triangles from six quads: triangles 2k, 2k+1 come from file face k
    const sourceFace = Uint32Array.from({ length: 12 }, (_, t) => t >> 1)
    const e = err({ positions: b.positions, indices: b.indices.slice(0, 33), sourceFace: sourceFace.slice(0, 11) })
    expect(e.code).toBe('open-mesh')
    expect(e.message).toMatch(/first faces: .*face 0\)/)
    expect(e.issues.every(i => /^faces\[[0-5]\]$/.test(i.path))).toBe(true)
    // a map that does not describe the given triangles (wrong length) is ignored
    const e2 = err({ positions: b.positions, indices: b.indices.slice(0, 33), sourceFace })
    expect(e2.message).toMatch(/first triangles/)
  })
  it('open-mesh', () => {
    const b = boxMesh(1, 1, 1)
    const e = err({ positions: b.positions, indices: b.indices.slice(0, 33) })
    expect(e.code).toBe('open-mesh')
    expect(e.message).toMatch(/3 boundary edges/)
  })
  it('non-manifold-edge (two tetrahedra sharing an edge)', () => {
    const a = tet([0, 0, 0])
    const b: TriMesh = { positions: Float64Array.from([0, 0, 0, 1, 0, 0, 0, -1, 0, 0, 0, -1]), indices: Uint32Array.from([0, 1, 2, 0, 3, 1, 0, 2, 3, 1, 3, 2]) }
    const m = mergeMeshes([a, b])
    // share vertices 0 and 1 of both (edge 0–1)
    const idx = m.indices.map(v => (v === 4 ? 0 : v === 5 ? 1 : v))
    expect(err({ positions: m.positions, indices: idx }).code).toBe('non-manifold-edge')
  })
  it('non-manifold-vertex (two tetrahedra touching at one vertex)', () => {
    const m = mergeMeshes([tet([0, 0, 0]), tet([0, 0, 0], -1)])
    const idx = m.indices.map(v => (v === 4 ? 0 : v))
    expect(err({ positions: m.positions, indices: idx }).code).toBe('non-manifold-vertex')
  })
  it('non-orientable (6-vertex real projective plane, closed)', () => {
    const rnd = seededRandom(1)
    const positions = Float64Array.from({ length: 18 }, () => rnd())
    const faces = [1, 2, 3, 1, 3, 4, 1, 4, 5, 1, 5, 6, 1, 6, 2, 2, 3, 5, 3, 4, 6, 4, 5, 2, 5, 6, 3, 6, 2, 4].map(v => v - 1)
    expect(err({ positions, indices: Uint32Array.from(faces) }).code).toBe('non-orientable')
  })
  it('empty-mesh', () => {
    expect(err({ positions: new Float64Array(0), indices: new Uint32Array(0) }).code).toBe('empty-mesh')
  })
})

describe('closedOrientedManifold: the quick check of clean input (closed, one winding, manifold edges and vertices; common practice, no source)', () => {
  const ok = (m: TriMesh) => closedOrientedManifold(m.indices, m.positions.length / 3)
  it('accepts closed, consistently wound surfaces, inside-out ones and several bodies included', () => {
    expect(ok(icosphere(3))).toBe(true)
    expect(ok(boxMesh(1, 2, 3))).toBe(true)
    expect(ok(flipAll(icosphere(2)))).toBe(true)
    expect(ok(mergeMeshes([icosphere(1), boxMesh(1, 1, 1, [5, 0, 0])]))).toBe(true)
    // a vertex used by no face is ignored
    const b = boxMesh(1, 1, 1)
    expect(ok({ positions: Float64Array.from([...b.positions, 9, 9, 9]), indices: b.indices })).toBe(true)
  })
  it('rejects every defect the edge analysis and the fan check reject', () => {
    const b = boxMesh(1, 1, 1)
    expect(ok({ positions: b.positions, indices: b.indices.slice(0, 33) })).toBe(false) // open
    const one = b.indices.slice(); [one[1], one[2]] = [one[2]!, one[1]!]
    expect(ok({ positions: b.positions, indices: one })).toBe(false) // one face wound against its neighbours
    const a = tet([0, 0, 0])
    const t2: TriMesh = { positions: Float64Array.from([0, 0, 0, 1, 0, 0, 0, -1, 0, 0, 0, -1]), indices: Uint32Array.from([0, 1, 2, 0, 3, 1, 0, 2, 3, 1, 3, 2]) }
    const m = mergeMeshes([a, t2])
    expect(ok({ positions: m.positions, indices: m.indices.map(v => (v === 4 ? 0 : v === 5 ? 1 : v)) })).toBe(false) // edge shared by four faces
    const pinch = mergeMeshes([tet([0, 0, 0]), tet([0, 0, 0], -1)])
    expect(ok({ positions: pinch.positions, indices: pinch.indices.map(v => (v === 4 ? 0 : v)) })).toBe(false) // two fans at one vertex
    const rp2 = [1, 2, 3, 1, 3, 4, 1, 4, 5, 1, 5, 6, 1, 6, 2, 2, 3, 5, 3, 4, 6, 4, 5, 2, 5, 6, 3, 6, 2, 4].map(v => v - 1)
    expect(ok({ positions: new Float64Array(18), indices: Uint32Array.from(rp2) })).toBe(false) // not orientable
    const deg = b.indices.slice(); deg[2] = deg[1]!
    expect(ok({ positions: b.positions, indices: deg })).toBe(false) // a face with a repeated vertex
    const twice = Uint32Array.from([...b.indices, ...b.indices])
    expect(ok({ positions: b.positions, indices: twice })).toBe(false) // every face twice
  })
  it('agrees with validateMesh on random damage to a sphere: accepted as is exactly when the quick check passes', () => {
    const rnd = seededRandom(7)
    for (let trial = 0; trial < 60; trial++) {
      const s = icosphere(2)
      const I = s.indices.slice()
      const nf = I.length / 3
      const kind = trial % 3
      const f = Math.floor(rnd() * nf)
      if (kind === 0) { [I[3 * f + 1], I[3 * f + 2]] = [I[3 * f + 2]!, I[3 * f + 1]!] }
      else if (kind === 1) I.copyWithin(3 * f, 3 * f + 3)
      else I[3 * f] = I[3 * ((f + 7) % nf) + 1]!
      const m: TriMesh = { positions: s.positions, indices: kind === 1 ? I.slice(0, I.length - 3) : I }
      let clean = true
      try { const v = validateMesh(m, { weld: 'never', selfIntersectionMaxFaces: 0 }); clean = v.report.flippedFaces === 0 && v.report.degenerateFaces === 0 && v.report.unreferencedVertices === 0 }
      catch { clean = false }
      expect(ok(m)).toBe(clean)
    }
  })
})

describe('validateMesh component labels', () => {
  // Labels number components in order of first triangle (common practice, no source): two
  // separate spheres merged one after the other give 0 for the first sphere's triangles, 1 after.
  it('componentLabels match the merge order and faceComponents, with and without winding repair', () => {
    const a = icosphere(2), b = icosphere(2, 1, [3, 0, 0])
    const nA = a.indices.length / 3, nB = b.indices.length / 3
    const merged = mergeMeshes([a, b])
    const partlyFlipped = merged.indices.slice()
    for (const f of [1, nA + 5]) { const t = partlyFlipped[3 * f + 1]!; partlyFlipped[3 * f + 1] = partlyFlipped[3 * f + 2]!; partlyFlipped[3 * f + 2] = t }
    for (const m of [merged, { positions: merged.positions, indices: partlyFlipped }]) {
      const { mesh, report, componentLabels } = validateMesh(m)
      expect(report.components).toBe(2)
      expect(Array.from(componentLabels)).toEqual([...Array<number>(nA).fill(0), ...Array<number>(nB).fill(1)])
      expect(Array.from(faceComponents(mesh).label)).toEqual(Array.from(componentLabels))
    }
  })
})
