import { describe, expect, it } from 'vitest'
import { boxMesh, ellipsoidMesh, icosphere } from '../../../shared/geometry/generate'
import { G, massProperties } from '../../../shared/geometry/mass'
import { acceleration, evaluationPoints, potential, preparePolyhedron, solidAngleSum, summarise, surfaceEscapeSpeed, surfaceFieldChunk, surfaceFieldWithEscape } from '../../../shared/geometry/gravity'
import { close, closeVec, ellipsoidPotential } from './helpers'

describe('polyhedral gravity (Werner & Scheeres 1997)', () => {
  it('cube [−½,½]³ at (1,2,3): published polyhedral-gravity test values (G = 6.67408e-11 there)', () => {
    const m = preparePolyhedron(boxMesh(1, 1, 1))
    const Gold = 6.67408e-11
    close(potential(m, 1e6, [1, 2, 3]) / (G * 1e6), 0.26726619638669064, 1e-12)
    const g = acceleration(m, 1e6, [1, 2, 3]).map(x => (x * Gold) / G)
    closeVec(g, [-1.273782722739791e-6, -2.548008881415967e-6, -3.823026510474731e-6], 1e-11)
  })
  it('Σω = 4π inside, 0 outside (SCIENCE.md §4)', () => {
    const m = preparePolyhedron(ellipsoidMesh(3, 2, 1, 3))
    for (const p of [[0, 0, 0], [2, 0.5, 0.2], [-1, 1, 0.5]] as const) close(solidAngleSum(m, [...p]), 4 * Math.PI, 1e-12)
    for (const p of [[4, 0, 0], [0, 0, 1.5], [10, 10, 10]] as const) close(solidAngleSum(m, [...p]), 0, 0, 1e-12)
  })
  it('Laplace/Poisson: the potential is continuous and g = ∇U (finite differences)', () => {
    const m = preparePolyhedron(ellipsoidMesh(2, 1.5, 1, 3))
    const p: [number, number, number] = [2.5, 0.7, -0.4]
    const g = acceleration(m, 1000, p)
    const h = 1e-4
    for (let d = 0; d < 3; d++) {
      const a = [...p] as [number, number, number], b = [...p] as [number, number, number]
      a[d] += h; b[d] -= h
      close((potential(m, 1000, a) - potential(m, 1000, b)) / (2 * h), g[d]!, 1e-6, 1e-16)
    }
  })
  it('exterior potential of a homogeneous ellipsoid converges with refinement (MacMillan 1930 / Chandrasekhar 1969 via Carlson R_F, R_D)', () => {
    const [a, b, c] = [3, 2, 1.2], rho = 1000
    const pts: [number, number, number][] = [[4, 0, 0], [0, 3, 1], [2, 2, 2], [0, 0, 1.5]]
    let prev = Infinity
    for (const n of [3, 4, 5]) {
      const mesh = ellipsoidMesh(a, b, c, n)
      const model = preparePolyhedron(mesh)
      let worst = 0
      for (const p of pts) {
        const exact = ellipsoidPotential(a, b, c, G * rho * (4 / 3) * Math.PI * a * b * c, p)
        worst = Math.max(worst, Math.abs(potential(model, rho, p) - exact) / exact)
      }
      expect(worst).toBeLessThan(prev / 3)
      prev = worst
    }
    expect(prev).toBeLessThan(1e-3)
    // the reference itself reduces to GM/r for a sphere
    close(ellipsoidPotential(2, 2, 2, 5, [3, 4, 0]), 1, 1e-13)
  })
  it('sphere surface gravity GM/R², and with spin the centrifugal term ω²R at the equator', async () => {
    const R = 1000, rho = 2000
    const mesh = icosphere(4, R)
    const model = preparePolyhedron(mesh)
    const M = massProperties(mesh, { density: rho }).mass
    const ep = await evaluationPoints(mesh, 1500)
    const n = ep.points.length / 3
    const out = { gravity: new Float64Array(n), slopeDeg: new Float64Array(n), potential: new Float64Array(n), totalAcceleration: new Float64Array(n) }
    surfaceFieldChunk(model, rho, ep.points, ep.normals, null, 0, n, out)
    // face centroids sit slightly inside the sphere (r ≈ 0.9997 R at this resolution)
    const s = summarise(out.gravity, ep.areas)
    close(s.mean, (G * M) / R ** 2, 6e-3)
    expect(summarise(out.slopeDeg, ep.areas).mean).toBeLessThan(3)
    const omega = 2 * Math.PI / (4 * 3600)
    const outS = { gravity: new Float64Array(n), slopeDeg: new Float64Array(n), potential: new Float64Array(n), totalAcceleration: new Float64Array(n) }
    surfaceFieldChunk(model, rho, ep.points, ep.normals, { omega: [0, 0, omega] }, 0, n, outS)
    // the face closest to the equator: total = g − ω² r
    let best = 0
    for (let i = 0; i < n; i++) if (Math.abs(ep.points[3 * i + 2]!) < Math.abs(ep.points[3 * best + 2]!)) best = i
    const rxy = Math.hypot(ep.points[3 * best]!, ep.points[3 * best + 1]!)
    close(outS.totalAcceleration[best]!, out.gravity[best]! - omega * omega * rxy, 1e-3)
    expect(outS.gravity[best]).toBe(out.gravity[best])
    close(outS.potential[best]! - out.potential[best]!, 0.5 * omega * omega * rxy * rxy, 1e-9)
    // escape speed √(2U) ≈ √(2GM/R); along the rotation the surface speed is subtracted
    const esc = surfaceEscapeSpeed(model, rho, ep.points, { omega: [0, 0, omega] }, ep.areas)
    close(esc.summary.nonRotating.mean, Math.sqrt((2 * G * M) / R), 4e-3)
    close(esc.alongRotation![best]!, esc.nonRotating[best]! - omega * rxy, 1e-9)
    // The surface-field job's single-pass kernel: the same escape speeds from the potential it already
    // evaluated, and with spin still the non-rotating √(2U) (U gravitational only), ≈ √(2GM/R) (Newton).
    const job = surfaceFieldWithEscape(model, rho, ep.points, ep.normals, { omega: [0, 0, omega] }, undefined, 7)
    for (let i = 0; i < n; i++) close(job.escape[i]!, esc.nonRotating[i]!, 1e-14)
    close(summarise(job.escape, ep.areas).mean, Math.sqrt((2 * G * M) / R), 4e-3)
    expect(job.potential[best]).toBe(outS.potential[best])
    expect(job.slopeDeg[best]).toBe(outS.slopeDeg[best])
  })
  it('evaluationPoints simplifies to ≤ maxPoints faces (meshoptimizer)', async () => {
    const ep = await evaluationPoints(icosphere(5), 2000)
    expect(ep.points.length / 3).toBeLessThanOrEqual(2000)
    expect(ep.points.length / 3).toBeGreaterThan(1000)
    expect(ep.areas.length).toBe(ep.points.length / 3)
  })
})
