import { describe, expect, it } from 'vitest'
import { acceleration, boxMesh, ellipsoidMesh, evaluationPoints, G, icosphere, massProperties, potential, preparePolyhedron, solidAngleSum, summarise, surfaceEscapeSpeed, surfaceFieldChunk, surfaceFieldWithEscape } from '#shared/geometry'
import { close, closeVec, ellipsoidPotential } from './helpers'

describe('polyhedral gravity (Werner & Scheeres 1997)', () => {
  it('cube [−½,½]³ at (1,2,3): published polyhedral-gravity test values (G = 6.67408e-11 there)', () => {
    const m = preparePolyhedron(boxMesh(1, 1, 1))
    const Gold = 6.67408e-11
    close(potential(m, 1e6, [1, 2, 3]) / (G * 1e6), 0.26726619638669064, 1e-12)
    const g = acceleration(m, 1e6, [1, 2, 3]).map(x => (x * Gold) / G)
    closeVec(g, [-1.273782722739791e-6, -2.548008881415967e-6, -3.823026510474731e-6], 1e-11)
  })
  it('Σω = 4π inside, 0 outside (docs/polyhedral-gravity.md)', () => {
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
  it('sphere surface gravity GM/R² (area mean), and with spin the potential term ½ω²r⊥² and escape speeds', async () => {
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
    // the face closest to the equator: spin leaves the attraction alone and adds ½ω²r⊥² to the potential
    // (the closed-form total at the equator and the pole is checked in the next test)
    let best = 0
    for (let i = 0; i < n; i++) if (Math.abs(ep.points[3 * i + 2]!) < Math.abs(ep.points[3 * best + 2]!)) best = i
    const rxy = Math.hypot(ep.points[3 * best]!, ep.points[3 * best + 1]!)
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
  it('spinning sphere: total surface acceleration GM/R² − ω²R⊥ at the equator, GM/R² at the pole, error O(h²)', () => {
    // Closed forms: outside a homogeneous sphere g = GM/r² (Newton's shell theorem); in the rotating
    // frame the centrifugal term ω²R⊥ points away from the axis, so at the equator (radial, R⊥ = R)
    // the magnitude is GM/R² − ω²R⊥ and on the axis it is GM/R² (common practice, no source).
    // M = ρ·4πR³/3 of the exact sphere. Points are face centroids of the inscribed icosphere; the
    // spin axis is put through the centroid of one face, so that face is exactly on the pole.
    // Tolerance from the resolution: the mesh's own relative volume deficit ε_V = 1 − V_mesh/V
    // (O(h²); measured errors are 0.2–0.6 ε_V), and the error must fall ≈4× per subdivision.
    const R = 1000, rho = 2000
    const omega = 2 * Math.PI / (4 * 3600) // 4 h period: ω²R/g ≈ 0.34, a large centrifugal term
    const M = rho * (4 / 3) * Math.PI * R ** 3
    const g0 = (G * M) / R ** 2
    let prev = { eq: Infinity, pole: Infinity }
    for (const level of [3, 4]) {
      const mesh = icosphere(level, R)
      const epsV = 1 - massProperties(mesh, { density: rho }).volume / ((4 / 3) * Math.PI * R ** 3)
      const model = preparePolyhedron(mesh)
      const P = mesh.positions, I = mesh.indices
      const centroid = (f: number): [number, number, number] => [0, 1, 2].map(d => (P[3 * I[3 * f]! + d]! + P[3 * I[3 * f + 1]! + d]! + P[3 * I[3 * f + 2]! + d]!) / 3) as [number, number, number]
      // pole face: the one most nearly along +z; its centroid direction is the spin axis
      let pf = 0
      for (let f = 0; f < I.length / 3; f++) if (centroid(f)[2] / Math.hypot(...centroid(f)) > centroid(pf)[2] / Math.hypot(...centroid(pf))) pf = f
      const pc = centroid(pf)
      const axis = pc.map(x => x / Math.hypot(...pc)) as [number, number, number]
      // equator face: centroid most nearly perpendicular to the axis
      let ef = 0
      const cosAx = (f: number) => Math.abs(centroid(f).reduce((s, x, d) => s + x * axis[d]!, 0)) / Math.hypot(...centroid(f))
      for (let f = 0; f < I.length / 3; f++) if (cosAx(f) < cosAx(ef)) ef = f
      expect(cosAx(ef)).toBeLessThan(0.05)
      const ec = centroid(ef)
      const rPerp = Math.hypot(...ec.map((x, d) => x - ec.reduce((s, y, k) => s + y * axis[k]!, 0) * axis[d]!))
      const points = Float64Array.from([...pc, ...ec])
      const normals = Float64Array.from([...axis, ...ec.map(x => x / Math.hypot(...ec))])
      const out = { gravity: new Float64Array(2), slopeDeg: new Float64Array(2), potential: new Float64Array(2), totalAcceleration: new Float64Array(2) }
      surfaceFieldChunk(model, rho, points, normals, { omega: axis.map(x => x * omega) as [number, number, number] }, 0, 2, out)
      const err = {
        pole: Math.abs(out.totalAcceleration[0]! - g0) / g0,
        eq: Math.abs(out.totalAcceleration[1]! - (g0 - omega * omega * R)) / (g0 - omega * omega * R),
      }
      expect(err.pole, `pole, level ${level}`).toBeLessThan(epsV)
      expect(err.eq, `equator, level ${level}`).toBeLessThan(epsV)
      // the equator face really carries the centrifugal term (R⊥ within ε_V·R of R)
      close(rPerp, R, 2 * epsV)
      expect(err.pole).toBeLessThan(prev.pole / 3)
      expect(err.eq).toBeLessThan(prev.eq / 3)
      prev = err
    }
  })
  it('evaluationPoints simplifies to ≤ maxPoints faces (meshoptimizer)', async () => {
    const ep = await evaluationPoints(icosphere(5), 2000)
    expect(ep.points.length / 3).toBeLessThanOrEqual(2000)
    expect(ep.points.length / 3).toBeGreaterThan(1000)
    expect(ep.areas.length).toBe(ep.points.length / 3)
  })
})
