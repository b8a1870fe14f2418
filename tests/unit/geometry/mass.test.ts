import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { boxMesh, ellipsoidMesh, G, harmonicsFromIntegrals, icosphere, massProperties, mergeMeshes, perturbedEllipsoid, seededRandom, solidHarmonicIntegrals, transformMesh, validateMesh, withDensity, withReferenceRadius } from '#shared/geometry'
import type { TriMesh, Vec3 } from '#shared/geometry'
import { axisAngle, close, closeMat, closeVec, relabel } from './helpers'

function tetra(p: Vec3[]): TriMesh {
  const positions = Float64Array.from(p.flat())
  const faces = [[0, 2, 1], [0, 1, 3], [0, 3, 2], [1, 2, 3]]
  const [a, b, c, d] = p as [Vec3, Vec3, Vec3, Vec3]
  const u = [b[0] - a[0], b[1] - a[1], b[2] - a[2]], v = [c[0] - a[0], c[1] - a[1], c[2] - a[2]], w = [d[0] - a[0], d[1] - a[1], d[2] - a[2]]
  const det = u[0]! * (v[1]! * w[2]! - v[2]! * w[1]!) - u[1]! * (v[0]! * w[2]! - v[2]! * w[0]!) + u[2]! * (v[0]! * w[1]! - v[1]! * w[0]!)
  const idx = faces.map(f => (det > 0 ? f : [f[0]!, f[2]!, f[1]!])).flat()
  return { positions, indices: Uint32Array.from(idx) }
}

describe('massProperties: published worked example and closed forms', () => {
  it('Tonon 2005 tetrahedron (J. Math. Stat. 1(1):8–11), rtol 1e-7', () => {
    const m = tetra([[8.33220, -11.86875, 0.93355], [0.75523, 5.00000, 16.37072], [52.61236, 5.00000, -5.38580], [2.00000, 5.00000, 3.00000]])
    const p = massProperties(m, { density: 1 })
    const [a, b, c, a1, b1, c1] = [43520.33257, 194711.28938, 191168.76173, 4417.66150, -46343.16662, 11996.20119]
    // Every entry (the smallest is a′ ≈ 4.4e3 kg m²) is far from zero: relative tolerance only, no
    // absolute term that would loosen the products of inertia.
    closeMat(p.inertia, [[a, -c1, -b1], [-c1, b, -a1], [-b1, -a1, c]], 1e-7)
    close(p.volume, 11239.4 / 6, 1e-7) // |det J|/6, the paper's rounded determinant
    // the centroid of a tetrahedron is its vertex mean exactly (x = 15.9249475); the printed
    // 5-decimal values (15.92492, 0.78281, 3.72962) agree to 3e-5 absolute, so compare loosely with them
    closeVec(p.centroid, [15.9249475, 0.7828125, 3.7296175], 1e-14)
    closeVec(p.centroid, [15.92492, 0.78281, 3.72962], 0, 3e-5)
  })
  it('box (textbook: I_x = M(L_y²+L_z²)/12), exact for any placement', () => {
    const p = massProperties(boxMesh(2, 3, 5, [10, -4, 7]), { density: 1500 })
    const M = 1500 * 30
    close(p.mass, M, 1e-14)
    closeVec(p.centroid, [10, -4, 7], 1e-14)
    closeVec(p.principalMoments, [M * (9 + 25) / 12, M * (4 + 25) / 12, M * (4 + 9) / 12].sort((x, y) => x - y), 1e-13)
    close(p.surfaceArea, 2 * (6 + 10 + 15), 1e-14)
    closeVec(p.ellipsoidSemiAxes, [5, 3, 2].map(x => x / 2 * Math.sqrt(5 / 3)), 1e-13)
  })
  it('sphere (V = 4πR³/3, I = 2MR²/5) converges at O(h²) with resolution', () => {
    const R = 3
    let prevErr = Infinity
    for (const n of [3, 4, 5, 6]) {
      const p = massProperties(icosphere(n, R), { density: 1 })
      const F = 20 * 4 ** n
      const V = (4 / 3) * Math.PI * R ** 3
      const errV = Math.abs(p.volume - V) / V
      // inscribed icosphere: deficit ≈ 10/F (docs/mass-properties.md: ~2e-3 at 5120 faces, ~5e-4 at 20480)
      expect(errV).toBeLessThan(12 / F)
      expect(errV).toBeLessThan(prevErr / 3.5)
      prevErr = errV
      for (const I of p.principalMoments) close(I, (2 / 5) * p.mass * R * R, 2 * 12 / F)
      close(p.J2, 0, 0, 1e-5)
      close(p.equivalentRadius, R, 12 / F)
    }
  })
  it('ellipsoid (V = 4πabc/3, A = M(b²+c²)/5 ...) and Tee 2005 surface area 54.6901240998, at several resolutions', () => {
    // Closed forms: textbook (docs/mass-properties.md); area: Legendre's formula, worked value in Tee 2005,
    // New Zealand J. Math. 34, 165–198. The mesh is an affine image of an inscribed icosphere, so its
    // errors are O(h²) ∝ 1/F (F faces): measured ≈ 11/F (volume), 18.5/F (moments), 6.1/F (area).
    // Tolerances k/F with k just above those constants, and the error must fall ≈4× per level.
    const [a, b, c] = [4.7, 1.2, 1.1]
    const V = (4 / 3) * Math.PI * a * b * c
    const S = 54.6901240998
    let prev = { V: Infinity, I: Infinity, S: Infinity }
    for (const n of [3, 4, 5, 6]) {
      const F = 20 * 4 ** n
      const p = massProperties(ellipsoidMesh(a, b, c, n), { density: 1 })
      const mom = [p.mass * (b * b + c * c) / 5, p.mass * (a * a + c * c) / 5, p.mass * (a * a + b * b) / 5]
      const err = {
        V: Math.abs(p.volume - V) / V,
        I: Math.max(...p.principalMoments.map((x, i) => Math.abs(x - mom[i]!) / mom[i]!)),
        S: Math.abs(p.surfaceArea - S) / S,
      }
      expect(err.V, `volume, ${F} faces`).toBeLessThan(12 / F)
      expect(err.I, `moments, ${F} faces`).toBeLessThan(20 / F)
      expect(err.S, `area, ${F} faces`).toBeLessThan(7 / F)
      for (const k of ['V', 'I', 'S'] as const) expect(err[k], `${k} falls with refinement`).toBeLessThan(prev[k] / 3.5)
      prev = err
      closeVec(p.ellipsoidSemiAxes, [a, b, c], 15 / F)
      // DEEVE: moment-matched ellipsoid scaled to the body's volume (Dobrovolskis 1996 [mem])
      close((4 / 3) * Math.PI * p.deeveSemiAxes[0] * p.deeveSemiAxes[1] * p.deeveSemiAxes[2], p.volume, 1e-12)
    }
  })
  it('Balmino 1994 ellipsoid J2 = (a²+b²−2c²)/(10R²), C22 = (a²−b²)/(20R²); density-independent', () => {
    const [a, b, c] = [3, 2, 1]
    for (const n of [5, 6]) {
      const F = 20 * 4 ** n
      const p = massProperties(ellipsoidMesh(a, b, c, n), { density: 2000, referenceRadius: 2.5 })
      close(p.J2, (a * a + b * b - 2 * c * c) / (10 * 2.5 ** 2), 30 / F)
      close(p.C22, (a * a - b * b) / (20 * 2.5 ** 2), 30 / F)
      close(p.C20Normalized, -p.J2 / Math.sqrt(5), 1e-14)
      close(p.C22Normalized, p.C22 / Math.sqrt(5 / 12), 1e-14)
      const q = withDensity(p, 500)
      expect(q.J2).toBe(p.J2)
      close(q.mass, p.mass / 4, 1e-14)
      close(q.escapeSpeedPointMass, p.escapeSpeedPointMass / 2, 1e-14)
    }
  })
  it('L of three unit cubes: products of inertia sign (docs/conventions.md [derived])', () => {
    // one closed mesh: the L prism (L-shaped polygon extruded along z)
    const poly = [[0, 0], [2, 0], [2, 1], [1, 1], [1, 2], [0, 2]]
    const pos: number[] = []
    for (const z of [0, 1]) for (const [x, y] of poly) pos.push(x!, y!, z)
    const idx: number[] = [0, 2, 1, 0, 3, 2, 0, 5, 3, 5, 4, 3] // bottom (z=0), outward −z
    idx.push(...[6, 7, 8, 6, 8, 9, 6, 9, 11, 11, 9, 10]) // top, outward +z
    for (let i = 0; i < 6; i++) { const j = (i + 1) % 6; idx.push(i, j, 6 + j, i, 6 + j, 6 + i) }
    const L = { positions: Float64Array.from(pos), indices: Uint32Array.from(idx) }
    const { mesh, report, componentLabels } = validateMesh(L)
    expect(report.flippedFaces + report.invertedComponents).toBe(0)
    const p = massProperties(mesh, { density: 1 })
    close(p.volume, 3, 1e-14)
    closeMat(p.inertia, [[7 / 6, 1 / 3, 0], [1 / 3, 7 / 6, 0], [0, 0, 11 / 6]], 1e-13, 1e-14)
    closeVec(p.principalMoments, [5 / 6, 3 / 2, 11 / 6], 1e-13)
    // and the three separate cubes give the same tensor (components summed)
    const cubes = mergeMeshes([boxMesh(1, 1, 1, [0.5, 0.5, 0.5]), boxMesh(1, 1, 1, [1.5, 0.5, 0.5]), boxMesh(1, 1, 1, [0.5, 1.5, 0.5])])
    const q = massProperties(cubes, { density: 1 })
    closeMat(q.inertia, p.inertia, 1e-13, 1e-14)
    expect(q.components).toHaveLength(3)
    // validateMesh's components passed along instead of searched again: the three cubes touch
    // along edges and faces but are separate solids; the L-prism is one piece and gets no
    // component list either way
    const v = validateMesh(cubes)
    expect(massProperties(v.mesh, { density: 1, components: { label: v.componentLabels, count: v.report.components } }).components).toEqual(massProperties(v.mesh, { density: 1 }).components)
    expect(massProperties(v.mesh, { density: 1 }).components).toHaveLength(3)
    expect(p.components).toBeUndefined()
    expect(massProperties(mesh, { density: 1, components: { label: componentLabels, count: report.components } })).toEqual(p)
  })
})

describe('harmonics (degree ≤ 4)', () => {
  it('sphere: all coefficients above degree 0 ≈ 0 (O(h²))', () => {
    const p = massProperties(icosphere(5, 2), { density: 1 })
    for (let l = 1; l <= 4; l++) for (let m = 0; m <= l; m++) { close(p.harmonics.C[l]![m]!, 0, 0, 2e-3); close(p.harmonics.S[l]![m]!, 0, 0, 2e-3) }
    expect(p.harmonics.C[0]![0]).toBeCloseTo(1, 14)
  })
  it('ellipsoid degree 4 vs the homogeneous-ellipsoid series (Balmino 1994 [pub]; terms derived from uniform-ellipsoid moments ∫x⁴ = 3a⁴V/35, ∫x²y² = a²b²V/35)', () => {
    const [a, b, c] = [3, 2, 1], R = 1
    const p = massProperties(ellipsoidMesh(a, b, c, 6), { density: 1, referenceRadius: R })
    const C40 = (3 * (3 * a ** 4 + 3 * b ** 4 + 8 * c ** 4 + 2 * a * a * b * b - 8 * a * a * c * c - 8 * b * b * c * c)) / (280 * R ** 4)
    const C42 = ((a * a - b * b) * (2 * c * c - a * a - b * b)) / (280 * R ** 4)
    const C44 = (a * a - b * b) ** 2 / (2240 * R ** 4)
    const tol = 40 / (20 * 4 ** 6)
    close(p.harmonics.C[4]![0]!, C40, tol)
    close(p.harmonics.C[4]![2]!, C42, tol)
    close(p.harmonics.C[4]![4]!, C44, tol)
    for (const [l, m] of [[3, 0], [3, 1], [3, 2], [3, 3], [4, 1], [4, 3], [2, 1]] as const) close(p.harmonics.C[l]![m]!, 0, 0, 1e-12)
    close(p.harmonics.C[2]![0]!, -p.J2, 1e-12)
    close(p.harmonics.C[2]![2]!, p.C22, 1e-12)
    close(p.harmonics.normalized.C[4]![0]!, C40 / 3, tol)
  })
  it('moment path = direct quadrature path (two independent implementations)', () => {
    const m = perturbedEllipsoid(3, 2, 1.5, 4, 11, 0.25)
    const p = massProperties(m, { density: 1 })
    const ints = solidHarmonicIntegrals(m, p.centroid, p.rotationToPrincipal)
    const h = harmonicsFromIntegrals(ints, p.volume, p.referenceRadius, 'principal')
    for (let l = 0; l <= 4; l++) for (let k = 0; k <= l; k++) { close(h.C[l]![k]!, p.harmonics.C[l]![k]!, 1e-9, 1e-13); close(h.S[l]![k]!, p.harmonics.S[l]![k]!, 1e-9, 1e-13) }
    // degree 1 about the centroid vanishes; principal frame: C21 = S21 = S22 = 0 and C22 ≥ 0
    for (const v of [p.harmonics.C[1]![0]!, p.harmonics.C[1]![1]!, p.harmonics.S[1]![1]!, p.harmonics.C[2]![1]!, p.harmonics.S[2]![1]!, p.harmonics.S[2]![2]!]) close(v, 0, 0, 1e-12)
    expect(p.harmonics.C[2]![2]!).toBeGreaterThanOrEqual(0)
  })
  it('withReferenceRadius: C_lm ∝ R^−l', () => {
    const p = massProperties(perturbedEllipsoid(3, 2, 1, 3, 5, 0.2), { density: 1 })
    const q = withReferenceRadius(p, 2 * p.referenceRadius)
    close(q.J2, p.J2 / 4, 1e-14)
    close(q.harmonics.C[4]![2]!, p.harmonics.C[4]![2]! / 16, 1e-14)
    close(q.degree2.C20, p.degree2.C20 / 4, 1e-14)
  })
})

describe('invariances', () => {
  const base = perturbedEllipsoid(4, 2.5, 2, 4, 3, 0.25)
  const p0 = massProperties(base, { density: 1800 })
  it('translation (large offset) and rotation: principal moments unchanged, axes rotate', () => {
    const R = axisAngle([1, 2, 3], 0.9)
    const t: Vec3 = [1e6, -2e6, 3e5]
    const p = massProperties(transformMesh(base, R, t), { density: 1800 })
    closeVec(p.principalMoments, p0.principalMoments, 1e-9)
    close(p.volume, p0.volume, 1e-9)
    close(p.J2, p0.J2, 1e-8); close(p.C22, p0.C22, 1e-8)
    for (let l = 3; l <= 4; l++) for (let m = 0; m <= l; m++) close(Math.abs(p.harmonics.C[l]![m]!), Math.abs(p0.harmonics.C[l]![m]!), 1e-6, 1e-12)
    // axes rotate: R·a0 = ±a
    for (let k = 0; k < 3; k++) {
      const a0 = p0.principalAxes[k]!
      const ra = [0, 1, 2].map(i => R[i]![0] * a0[0] + R[i]![1] * a0[1] + R[i]![2] * a0[2])
      close(Math.abs(ra[0]! * p.principalAxes[k]![0] + ra[1]! * p.principalAxes[k]![1] + ra[2]! * p.principalAxes[k]![2]), 1, 1e-9)
    }
    closeVec(p.centroid, [0, 1, 2].map(i => R[i]![0] * p0.centroid[0] + R[i]![1] * p0.centroid[1] + R[i]![2] * p0.centroid[2] + t[i]!), 1e-12, 1e-6)
  })
  it('vertex relabelling and face order', () => {
    const p = massProperties(relabel(base, seededRandom(9)), { density: 1800 })
    closeVec(p.principalMoments, p0.principalMoments, 1e-12)
    closeMat(p.inertia, p0.inertia, 1e-11, 1e-12 * p0.principalMoments[2])
    closeVec(p.centroid, p0.centroid, 1e-12, 1e-13)
  })
  it('m vs km: lengths ×1000 → V ×1e9, I ×1e15, J2 unchanged', () => {
    const km = transformMesh(base, [[1000, 0, 0], [0, 1000, 0], [0, 0, 1000]], [0, 0, 0])
    const p = massProperties(km, { density: 1800 })
    close(p.volume, p0.volume * 1e9, 1e-12)
    closeVec(p.principalMoments, p0.principalMoments.map(x => x * 1e15), 1e-12)
    close(p.J2, p0.J2, 1e-12)
    close(p.escapeSpeedPointMass, p0.escapeSpeedPointMass * 1000, 1e-12)
    expect(p.G).toBe(G)
  })
  it('property (fast-check, seeded): vertex relabelling, face order and corner rotation change nothing', () => {
    // common practice, no source: the signed-tetrahedron sums do not depend on labels or order
    const small = perturbedEllipsoid(3, 2, 1, 3, 1, 0.2)
    const q0 = massProperties(small, { density: 1 })
    const scale = Math.max(...q0.principalMoments)
    fc.assert(fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), (seed) => {
      const q = massProperties(relabel(small, seededRandom(seed)), { density: 1 })
      close(q.volume, q0.volume, 1e-12)
      close(q.surfaceArea, q0.surfaceArea, 1e-12)
      // off-diagonal entries can be near zero: absolute term = 1e-12 × the largest moment
      closeMat(q.inertia, q0.inertia, 1e-11, 1e-12 * scale)
      closeVec(q.principalMoments, q0.principalMoments, 1e-11)
      close(q.J2, q0.J2, 1e-10)
    }), { seed: 4242, numRuns: 40 })
  })
  it('property (fast-check, seeded): uniform scaling s → V ∝ s³, I ∝ s⁵, J2 and C22 unchanged', () => {
    // dimensional analysis at fixed density (common practice, no source); J2 at the scaled
    // volume-equivalent radius is dimensionless (MacCullagh, docs/harmonics.md)
    const small = perturbedEllipsoid(3, 2, 1, 3, 7, 0.2)
    const q0 = massProperties(small, { density: 1200 })
    fc.assert(fc.property(fc.double({ min: 1e-3, max: 1e4, noNaN: true }), (s) => {
      const q = massProperties(transformMesh(small, [[s, 0, 0], [0, s, 0], [0, 0, s]], [0, 0, 0]), { density: 1200 })
      close(q.volume, q0.volume * s ** 3, 1e-12)
      close(q.mass, q0.mass * s ** 3, 1e-12)
      close(q.surfaceArea, q0.surfaceArea * s ** 2, 1e-12)
      closeVec(q.principalMoments, q0.principalMoments.map(x => x * s ** 5), 1e-11)
      close(q.equivalentRadius, q0.equivalentRadius * s, 1e-12)
      close(q.J2, q0.J2, 1e-10)
      close(q.C22, q0.C22, 1e-9)
    }), { seed: 777, numRuns: 40 })
  })
  it('property (fast-check, seeded): random rigid motions keep volume and moments', () => {
    const small = perturbedEllipsoid(3, 2, 1, 3, 1, 0.2)
    const q0 = massProperties(small, { density: 1 })
    fc.assert(fc.property(
      fc.tuple(fc.double({ min: -1, max: 1, noNaN: true }), fc.double({ min: -1, max: 1, noNaN: true }), fc.double({ min: 0.1, max: 1, noNaN: true })),
      fc.double({ min: 0, max: 6.28, noNaN: true }),
      fc.tuple(fc.double({ min: -1e4, max: 1e4, noNaN: true }), fc.double({ min: -1e4, max: 1e4, noNaN: true }), fc.double({ min: -1e4, max: 1e4, noNaN: true })),
      (axis, ang, t) => {
        const q = massProperties(transformMesh(small, axisAngle(axis, ang), t), { density: 1 })
        closeVec(q.principalMoments, q0.principalMoments, 1e-8)
        close(q.volume, q0.volume, 1e-9)
      }), { seed: 12345, numRuns: 60 })
  })
})
