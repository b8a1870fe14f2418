import { describe, expect, it } from 'vitest'
import { splitMeshByPlane } from '../../../shared/geometry/booleans'
import { validateMesh } from '../../../shared/geometry/validate'
import type { TriMesh } from '../../../shared/geometry/types'

// Repro: a cutting plane through a ring of mesh vertices left float32 near-duplicate vertices and a
// zero-area needle face on the cut, so the parts failed upload validation ('degenerate-face':
// "1 zero-area faces cannot be dropped without opening the mesh"). Body: two overlapping spheres
// (km-sized, in metres) as one surface of revolution, cut at the intersection plane, where a ring
// of its vertices lies; the same body as tests/e2e/split.test.ts.
const R1 = 1, R2 = 0.6, D = 1.4
// Intersection plane x_i = (d² + R1² − R2²)/(2d) (Weisstein, MathWorld "Sphere-Sphere Intersection").
const XI = (D * D + R1 * R1 - R2 * R2) / (2 * D)
function twoSphereUnion(around: number): TriMesh {
  const step = 2 * Math.PI / around
  const prof: [number, number][] = []
  const t1 = Math.acos(XI / R1), t2 = Math.acos((XI - D) / R2)
  const n1 = Math.ceil((Math.PI - t1) / step), n2 = Math.ceil(t2 / step)
  for (let k = 1; k <= n1; k++) { const t = Math.PI - (Math.PI - t1) * k / n1; prof.push([R1 * Math.cos(t), R1 * Math.sin(t)]) }
  for (let k = 1; k < n2; k++) { const t = t2 - t2 * k / n2; prof.push([D + R2 * Math.cos(t), R2 * Math.sin(t)]) }
  const pos: number[] = [-R1, 0, 0]
  for (const [x, r] of prof) for (let j = 0; j < around; j++) pos.push(x, r * Math.cos(j * step), r * Math.sin(j * step))
  pos.push(D + R2, 0, 0)
  const last = pos.length / 3 - 1
  const ring = (k: number, j: number) => 1 + k * around + (j % around)
  const idx: number[] = []
  for (let j = 0; j < around; j++) {
    idx.push(0, ring(0, j + 1), ring(0, j))
    for (let k = 0; k + 1 < prof.length; k++) idx.push(ring(k, j), ring(k, j + 1), ring(k + 1, j + 1), ring(k, j), ring(k + 1, j + 1), ring(k + 1, j))
    idx.push(last, ring(prof.length - 1, j), ring(prof.length - 1, j + 1))
  }
  return { positions: new Float64Array(pos), indices: new Uint32Array(idx) }
}

describe('splitMeshByPlane through a ring of vertices', () => {
  it('gives two parts that validate, with the volumes it reports', async () => {
    const m0 = twoSphereUnion(96)
    const mesh = validateMesh({ positions: m0.positions.map(v => v * 1000), indices: m0.indices }).mesh
    const r = await splitMeshByPlane(mesh, [1, 0, 0], XI * 1000)
    for (const [part, V] of [[r.positive, r.positiveVolume], [r.negative, r.negativeVolume]] as const) {
      const v = validateMesh(part)
      expect(v.report.faceCount).toBeGreaterThan(1000)
      // Welding moved no surface: manifold's own volume (float32, ~1e-7) agrees with the welded mesh.
      let V6 = 0
      const P = v.mesh.positions, I = v.mesh.indices
      for (let f = 0; f < I.length; f += 3) {
        const a = 3 * I[f]!, b = 3 * I[f + 1]!, c = 3 * I[f + 2]!
        V6 += P[a]! * (P[b + 1]! * P[c + 2]! - P[b + 2]! * P[c + 1]!) - P[a + 1]! * (P[b]! * P[c + 2]! - P[b + 2]! * P[c]!) + P[a + 2]! * (P[b]! * P[c + 1]! - P[b + 1]! * P[c]!)
      }
      // Signed-tetrahedra volume (SCIENCE.md §1).
      expect(V6 / 6 / V).toBeCloseTo(1, 5)
    }
  })
})
