import { describe, expect, it } from 'vitest'
import { evaluationPoints, perturbedEllipsoid, preparePolyhedron, surfaceFieldChunk } from '#shared/geometry'

// Repro: the surface slope of a smooth lobe came out up to 73° (true maximum ≈ 10°) because the
// field was evaluated with the normals of a meshoptimizer-simplified copy. The points now sit on
// the original faces with their own normals.
describe('evaluation points on a simplified surface', () => {
  const mesh = perturbedEllipsoid(11.2, 8.6, 7.1, 4, 17, 0.06)
  const nf = mesh.indices.length / 3

  function slopes(points: Float64Array, normals: Float64Array) {
    const model = preparePolyhedron(mesh)
    const n = points.length / 3
    const out = { gravity: new Float64Array(n), slopeDeg: new Float64Array(n), potential: new Float64Array(n) }
    surfaceFieldChunk(model, 500, points, normals, null, 0, n, out)
    return out.slopeDeg
  }

  it('uses centroids and normals of original faces, so slopes stay within the full mesh’s range', async () => {
    const ev = await evaluationPoints(mesh, 800)
    expect(ev.points.length / 3).toBeLessThanOrEqual(800)
    const P = mesh.positions, I = mesh.indices
    const centroids = new Set<string>()
    const fullPoints = new Float64Array(3 * nf), fullNormals = new Float64Array(3 * nf)
    for (let f = 0; f < nf; f++) {
      const a = 3 * I[3 * f]!, b = 3 * I[3 * f + 1]!, c = 3 * I[3 * f + 2]!
      const p = [0, 1, 2].map(d => (P[a + d]! + P[b + d]! + P[c + d]!) / 3)
      centroids.add(p.join(','))
      const u = [0, 1, 2].map(d => P[b + d]! - P[a + d]!), w = [0, 1, 2].map(d => P[c + d]! - P[a + d]!)
      const nrm = [u[1]! * w[2]! - u[2]! * w[1]!, u[2]! * w[0]! - u[0]! * w[2]!, u[0]! * w[1]! - u[1]! * w[0]!]
      const l = Math.hypot(...nrm)
      fullPoints.set(p, 3 * f)
      fullNormals.set(nrm.map(x => x / l), 3 * f)
    }
    for (let k = 0; k < ev.points.length / 3; k++) {
      expect(centroids.has([ev.points[3 * k], ev.points[3 * k + 1], ev.points[3 * k + 2]].join(','))).toBe(true)
    }
    const maxFull = Math.max(...slopes(fullPoints, fullNormals))
    expect(Math.max(...slopes(ev.points, ev.normals))).toBeLessThanOrEqual(maxFull + 1e-9)
  })
})
