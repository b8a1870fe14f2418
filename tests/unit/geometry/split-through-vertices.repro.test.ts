import { describe, expect, it } from 'vitest'
import { splitMeshByPlane, twoSphereBody, validateMesh } from '#shared/geometry'

// Repro: a cutting plane through a ring of mesh vertices left float32 near-duplicate vertices and a
// zero-area needle face on the cut, so the parts failed upload validation ('degenerate-face':
// "1 zero-area faces cannot be dropped without opening the mesh"). Body: two overlapping spheres
// (km-sized, in metres) as one surface of revolution, cut at the intersection plane, where a ring
// of its vertices lies; the same body as tests/e2e/split.test.ts.
const R1 = 1, R2 = 0.6, D = 1.4
// Intersection plane x_i = (d² + R1² − R2²)/(2d) (Weisstein, MathWorld "Sphere-Sphere Intersection").
const XI = (D * D + R1 * R1 - R2 * R2) / (2 * D)
const twoSphereUnion = (around: number) => twoSphereBody(R1, R2, D, around)

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
      // Signed-tetrahedra volume (docs/mass-properties.md).
      expect(V6 / 6 / V).toBeCloseTo(1, 5)
    }
  })
})
