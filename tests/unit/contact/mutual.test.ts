import { describe, expect, it } from 'vitest'
import { applyPose, boxMesh, firstContact, icosphere, massProperties, meshInContactFrame, mutualPotential, perturbedEllipsoid, potential, preparePolyhedron, volumeQuadrature } from '#shared/geometry'
import type { Pose, Vec3 } from '#shared/geometry'

const O: Vec3 = [0, 0, 0]
const ID: Pose = { quaternion: [1, 0, 0, 0], translation: [0, 0, 0] }

describe('volume quadrature', () => {
  it('integrates 1 and x² over the unit cube exactly (∫x² = 1/12 over [−½,½]³, elementary calculus)', () => {
    // Collapsed Gauss rule of order 3 is exact for degree ≤ 3 (2n − 3) on each tetrahedron.
    const q = volumeQuadrature(boxMesh(1, 1, 1), [0.1, -0.05, 0.2], 3)
    let v = 0, x2 = 0
    for (let k = 0; k < q.weights.length; k++) { v += q.weights[k]; x2 += q.weights[k] * q.points[3 * k] ** 2 }
    expect(v).toBeCloseTo(1, 13)
    expect(x2).toBeCloseTo(1 / 12, 13)
  })
})

describe('full-shape mutual potential', () => {
  it('reciprocity: ∫_B U_A dm = ∫_A U_B dm for two touching non-convex lobes', async () => {
    // Symmetry of the double integral Gρ_Aρ_B∫∫dV dV′/|r − r′| (Werner & Scheeres 2005, CMDA 91 [mem]).
    const A = perturbedEllipsoid(1.3, 1, 0.8, 2, 5, 0.15), B = perturbedEllipsoid(0.8, 0.7, 0.6, 2, 6, 0.15)
    const pA = massProperties(A, { density: 1 }), pB = massProperties(B, { density: 1 })
    const fc = firstContact({ meshA: A, meshB: B, centroidA: pA.centroid, centroidB: pB.centroid, direction: [1, 0.2, 0.1] })
    const Ac = meshInContactFrame(A, pA.centroid), Bc = applyPose(B, fc.poseB)
    const wAB = await mutualPotential(Ac, 1500, O, Bc, 2500, ID, { order: 4 })
    const wBA = await mutualPotential(Bc, 2500, O, Ac, 1500, ID, { order: 4 })
    const tol = 3 * Math.max(wAB.convergence!, wBA.convergence!) + 1e-9
    expect(Math.abs(wAB.W / wBA.W - 1)).toBeLessThan(tol)
    expect(tol).toBeLessThan(5e-3)
    // Newton's third law on the forces, same tolerance.
    expect(Math.abs(wAB.force[0] + wBA.force[0]) / Math.abs(wAB.force[0])).toBeLessThan(10 * tol)
  }, 60_000)

  it('sphere limit: W → m_B U_A(c_B) as a spherical B is refined (mean-value property, B outside A)', async () => {
    // For U_A harmonic inside B and B a homogeneous sphere, ∫_B U_A dm = m_B U_A(c_B) (Gauss mean
    // value theorem). A polyhedral sphere converges to it as O(h²). Same polyhedral U_A both ways.
    const A = perturbedEllipsoid(1.2, 0.9, 0.7, 2, 11, 0.1)
    const model = preparePolyhedron(A)
    const cB: Vec3 = [2.6, 0.3, -0.2]
    const errs: number[] = []
    for (const level of [1, 2, 3]) {
      const B = icosphere(level, 0.8)
      const mB = massProperties(B, { density: 1000 }).mass
      const w = await mutualPotential(A, 1000, O, B, 1000, { quaternion: [1, 0, 0, 0], translation: cB }, { order: 3, maxFaces: 5000 })
      errs.push(Math.abs(w.W / (mB * potential(model, 1000, cB)) - 1))
    }
    expect(errs[1]).toBeLessThan(errs[0])
    expect(errs[2]).toBeLessThan(errs[1])
    expect(errs[2]).toBeLessThan(5e-4)
  }, 60_000)
})
