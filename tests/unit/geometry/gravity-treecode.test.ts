import { describe, expect, it } from 'vitest'
import { allocateFaceFields, buildGravityTree, compareWithDirect, directSamples, ellipsoidMesh, faceCentroids, faceFieldChunk, factorial, G, geopotentialHeight, harmonicCount, irregularHarmonics, massProperties, perturbedEllipsoid, potentialAndAcceleration, preparePolyhedron, regularHarmonics, sampleIndices, shareGravityTree, simplexHarmonicSums, transformMesh, translateMoments, translationScratch, treecodeScratch, treeFieldChunk } from '#shared/geometry'
import type { GravityTree, TriMesh, Vec3 } from '#shared/geometry'
import { close } from './helpers'
import { gridCube, prismPotential } from './gravity-references'

/**
 * Points on (face centroids), near (± one edge length along the normal) and far (3–20 radii from the
 * vertex mean; not farther, where the direct sum's own cancellation reaches ~1e-9) from the surface.
 */
function testPoints(mesh: TriMesh, count: number): { on: Float64Array, near: Float64Array, far: Float64Array } {
  const { points, normals } = faceCentroids(mesh)
  const idx = sampleIndices(points.length / 3, count)
  const P = mesh.positions, I = mesh.indices
  const on = new Float64Array(3 * idx.length), near = new Float64Array(6 * idx.length), far = new Float64Array(3 * idx.length)
  const nv = P.length / 3
  const c = [0, 1, 2].map((k) => { let s = 0; for (let v = 0; v < nv; v++) s += P[3 * v + k]!; return s / nv })
  let rmax = 0
  for (let v = 0; v < nv; v++) rmax = Math.max(rmax, Math.hypot(P[3 * v]! - c[0]!, P[3 * v + 1]! - c[1]!, P[3 * v + 2]! - c[2]!))
  idx.forEach((f, s) => {
    const a = 3 * I[3 * f]!, b = 3 * I[3 * f + 1]!
    const h = Math.hypot(P[b]! - P[a]!, P[b + 1]! - P[a + 1]!, P[b + 2]! - P[a + 2]!)
    for (let k = 0; k < 3; k++) {
      on[3 * s + k] = points[3 * f + k]!
      near[6 * s + k] = points[3 * f + k]! + h * normals[3 * f + k]!
      near[6 * s + 3 + k] = points[3 * f + k]! - h * normals[3 * f + k]!
      const d = Math.hypot(points[3 * f]! - c[0]!, points[3 * f + 1]! - c[1]!, points[3 * f + 2]! - c[2]!)
      far[3 * s + k] = c[k]! + ((points[3 * f + k]! - c[k]!) / d) * rmax * (3 + (17 * s) / idx.length)
    }
  })
  return { on, near, far }
}

/** Largest relative errors of the treecode against the direct Werner & Scheeres sum at the points. */
function treeVsDirect(mesh: TriMesh, tree: GravityTree, pts: Float64Array): { u: number, g: number } {
  const n = pts.length / 3
  const U = new Float64Array(n), g = new Float64Array(3 * n)
  treeFieldChunk(tree, 1000, pts, 0, n, U, g)
  const model = preparePolyhedron(mesh)
  let eu = 0, eg = 0
  const gd: Vec3 = [0, 0, 0]
  for (let i = 0; i < n; i++) {
    const u = potentialAndAcceleration(model, 1000, [pts[3 * i]!, pts[3 * i + 1]!, pts[3 * i + 2]!], gd)
    const gm = Math.hypot(...gd)
    eu = Math.max(eu, Math.abs(U[i]! - u) / u)
    eg = Math.max(eg, Math.abs(Math.hypot(g[3 * i]!, g[3 * i + 1]!, g[3 * i + 2]!) - gm) / gm)
  }
  return { u: eu, g: eg }
}

describe('solid harmonics (the multipole algebra of the treecode and the coefficients)', () => {
  const p = 12, T = harmonicCount(p)
  it('addition theorem: Σ Υ(y)Θ(x) = 1/|x − y| (Legendre addition theorem; Jackson, Classical Electrodynamics §3.6)', () => {
    const Y = new Float64Array(2 * T), Th = new Float64Array(2 * T)
    const x = [1.3, -0.7, 2.1], y = [0.2, 0.3, -0.25]
    regularHarmonics(y[0]!, y[1]!, y[2]!, p, Y)
    irregularHarmonics(x[0]!, x[1]!, x[2]!, p, Th)
    let s = 0
    for (let n = 0; n <= p; n++) for (let m = 0; m <= n; m++) { const j = (n * (n + 1)) / 2 + m; s += (m ? 2 : 1) * (Y[2 * j]! * Th[2 * j]! + Y[2 * j + 1]! * Th[2 * j + 1]!) }
    // truncation (|y|/|x|)^13 ≈ 5e-10
    close(s, 1 / Math.hypot(x[0]! - y[0]!, x[1]! - y[1]!, x[2]! - y[2]!), 2e-9)
  })
  it('translation theorem Υ(a + b) = Σ Υ(b) Υ(a) (common practice, no source: checked against direct evaluation)', () => {
    const Ya = new Float64Array(2 * T), Yab = new Float64Array(2 * T), dst = new Float64Array(2 * T)
    regularHarmonics(0.3, -0.2, 0.5, p, Ya)
    regularHarmonics(0.4, 0.2, 0.2, p, Yab)
    translateMoments(Ya, 0, 0.1, 0.4, -0.3, p, 1, dst, 0, translationScratch(p, 1))
    for (let i = 0; i < 2 * T; i++) close(dst[i]!, Yab[i]!, 1e-11, 1e-16)
  })
  it('exact triangle integrals match a 12×12 collapsed Gauss–Legendre rule (exact to degree 22; Stroud 1971, Approximate Calculation of Multiple Integrals)', () => {
    const A = [0.5, 0.1, 0.2], B = [-0.2, 0.6, 0.3], C = [0.1, -0.3, 0.7]
    const h = new Float64Array(2 * T), s1 = new Float64Array(2 * T), s2 = new Float64Array(2 * T)
    simplexHarmonicSums(A[0]!, A[1]!, A[2]!, B[0]!, B[1]!, B[2]!, C[0]!, C[1]!, C[2]!, p, h, s1, s2)
    const cr = [(B[1]! - A[1]!) * (C[2]! - A[2]!) - (B[2]! - A[2]!) * (C[1]! - A[1]!), (B[2]! - A[2]!) * (C[0]! - A[0]!) - (B[0]! - A[0]!) * (C[2]! - A[2]!), (B[0]! - A[0]!) * (C[1]! - A[1]!) - (B[1]! - A[1]!) * (C[0]! - A[0]!)]
    const area = Math.hypot(cr[0]!, cr[1]!, cr[2]!) / 2
    const { x, w } = gaussLegendre01(12)
    const acc = new Float64Array(2 * T), tmp = new Float64Array(2 * T)
    for (let i = 0; i < 12; i++) {
      for (let j = 0; j < 12; j++) {
        const l1 = x[i]!, l2 = x[j]! * (1 - x[i]!), l0 = 1 - l1 - l2, wt = w[i]! * w[j]! * (1 - x[i]!) * 2 * area
        regularHarmonics(l0 * A[0]! + l1 * B[0]! + l2 * C[0]!, l0 * A[1]! + l1 * B[1]! + l2 * C[1]!, l0 * A[2]! + l1 * B[2]! + l2 * C[2]!, p, tmp)
        for (let q = 0; q < 2 * T; q++) acc[q] = acc[q]! + tmp[q]! * wt
      }
    }
    for (let n = 0; n <= p; n++) {
      for (let m = 0; m <= n; m++) {
        const j = (n * (n + 1)) / 2 + m
        close((2 * area * h[2 * j]!) / factorial(n + 2), acc[2 * j]!, 1e-11, 1e-17)
        close((2 * area * h[2 * j + 1]!) / factorial(n + 2), acc[2 * j + 1]!, 1e-11, 1e-17)
      }
    }
  })
})

describe('treecode vs the direct Werner & Scheeres 1997 sum (default accuracy: U 1e-8, |g| 1e-7 relative)', () => {
  // The direct sum is the reference (Werner & Scheeres 1997, Celest. Mech. Dyn. Astron. 65, 313);
  // the treecode is Barnes & Hut 1986 / Greengard & Rokhlin 1987 on the surface form of docs/polyhedral-gravity.md.
  const meshes: [string, TriMesh, number][] = [
    ['gridded cube (1 200 faces, leaves of 8)', gridCube(2000, 10), 8],
    ['20 480-face ellipsoid', ellipsoidMesh(1500, 1000, 800, 5), 32],
    ['bumpy lobe (5 120 faces, rotated and moved off the origin)', transformMesh(perturbedEllipsoid(1500, 1000, 800, 4, 7, 0.15), [0.9, 0.1, -0.3, 0.3], [5e4, -2e4, 1e4]), 16],
  ]
  for (const [name, mesh, leafSize] of meshes) {
    it(`${name}: points on, near (one edge length) and far from the surface`, () => {
      const tree = buildGravityTree(mesh, { leafSize })
      const { on, near, far } = testPoints(mesh, 60)
      for (const [where, pts] of [['on', on], ['near', near], ['far', far]] as const) {
        const e = treeVsDirect(mesh, tree, pts)
        expect(e.u, `${where}: U`).toBeLessThan(1e-8)
        expect(e.g, `${where}: |g|`).toBeLessThan(1e-7)
      }
    })
  }
  it('the accuracy parameter controls the error (a looser setting gives a larger error)', () => {
    const mesh = perturbedEllipsoid(1500, 1000, 800, 4, 3, 0.2)
    const { on } = testPoints(mesh, 60)
    const tight = treeVsDirect(mesh, buildGravityTree(mesh, { leafSize: 16 }), on)
    const loose = treeVsDirect(mesh, buildGravityTree(mesh, { leafSize: 16, accuracy: 1e-4 }), on)
    expect(loose.g).toBeLessThan(1e-4)
    expect(loose.g).toBeGreaterThan(tight.g)
  })
  it('cube: the closed-form prism potential (Nagy, Papp & Benedek 2000, J. Geodesy 74) outside and at the surface', () => {
    // the reference formula itself first: the published cube value of docs/polyhedral-gravity.md at (1, 2, 3)
    close(prismPotential(-0.5, 0.5, -0.5, 0.5, -0.5, 0.5, [1, 2, 3]), 0.26726619638669064, 1e-12)
    const L = 2000, rho = 2500
    const mesh = gridCube(L, 12)
    const tree = buildGravityTree(mesh, { leafSize: 8 })
    const pts = Float64Array.from([1300, 200, -150, 1700, 2100, 2900, 400, -1000.5, 300, 7000, -3000, 5000, 1000.5, 999, 998])
    const U = new Float64Array(5), g = new Float64Array(15)
    treeFieldChunk(tree, rho, pts, 0, 5, U, g)
    for (let i = 0; i < 5; i++) close(U[i]! / (G * rho), prismPotential(-L / 2, L / 2, -L / 2, L / 2, -L / 2, L / 2, [pts[3 * i]!, pts[3 * i + 1]!, pts[3 * i + 2]!]), 1e-8)
  })
  it('Laplacian by finite differences of g: −4πGρ inside, 0 outside (Poisson; docs/polyhedral-gravity.md)', () => {
    const rho = 1800
    const mesh = ellipsoidMesh(1500, 1000, 800, 4)
    const tree = buildGravityTree(mesh, { leafSize: 8 })
    const div = (p: Vec3) => {
      const h = 5
      const pts = new Float64Array(18)
      for (let d = 0; d < 3; d++) for (const [s, o] of [[1, 0], [-1, 1]] as const) { for (let k = 0; k < 3; k++) pts[3 * (2 * d + o) + k] = p[k]! + (k === d ? s * h : 0) }
      const U = new Float64Array(6), g = new Float64Array(18)
      treeFieldChunk(tree, rho, pts, 0, 6, U, g)
      let s = 0
      for (let d = 0; d < 3; d++) s += (g[3 * (2 * d) + d]! - g[3 * (2 * d + 1) + d]!) / (2 * h)
      return s
    }
    for (const p of [[0, 0, 0], [900, 300, 100], [-400, 500, -300]] as Vec3[]) close(div(p), -4 * Math.PI * G * rho, 1e-4)
    for (const p of [[2500, 0, 0], [1200, 900, 700], [0, 0, 3000]] as Vec3[]) close(div(p), 0, 0, 1e-4 * 4 * Math.PI * G * rho)
  })
  it('far away the field is GM/r and GM/r² (point-mass limit, Newton)', () => {
    const mesh = perturbedEllipsoid(1500, 1000, 800, 4, 5, 0.1)
    const mp = massProperties(mesh, { density: 1000 })
    const tree = buildGravityTree(mesh)
    const r = 1e6
    const pts = Float64Array.from([mp.centroid[0] + r, mp.centroid[1], mp.centroid[2], mp.centroid[0], mp.centroid[1] - r, mp.centroid[2]])
    const U = new Float64Array(2), g = new Float64Array(6)
    treeFieldChunk(tree, 1000, pts, 0, 2, U, g)
    const GM = G * mp.mass
    // the quadrupole term is ~(1.5 km / 1000 km)² ≈ 2e-6 of the monopole
    for (let i = 0; i < 2; i++) {
      close(U[i]!, GM / r, 1e-5)
      close(Math.hypot(g[3 * i]!, g[3 * i + 1]!, g[3 * i + 2]!), GM / (r * r), 1e-5)
    }
  })
  it('per-face fields: a shared tree gives the same values; slope, escape speed and heights follow the stated conventions', () => {
    const mesh = perturbedEllipsoid(1500, 1000, 800, 3, 2, 0.1)
    const tree = buildGravityTree(mesh, { leafSize: 8 })
    const shared = shareGravityTree(tree)
    expect(shared.moments.buffer).toBeInstanceOf(SharedArrayBuffer)
    const { points, normals, areas } = faceCentroids(mesh)
    const n = areas.length
    const omega: Vec3 = [0, 0, (2 * Math.PI) / (5 * 3600)]
    const a = allocateFaceFields(n), b = allocateFaceFields(n)
    faceFieldChunk(tree, 1000, points, normals, omega, 0, n, a)
    // in two chunks on the shared copy
    const s = treecodeScratch(shared)
    faceFieldChunk(shared, 1000, points, normals, omega, 0, 100, b, 0, s)
    faceFieldChunk(shared, 1000, points, normals, omega, 100, n, b, 0, s)
    expect(Array.from(b.gravity)).toEqual(Array.from(a.gravity))
    for (let i = 0; i < n; i += 37) {
      close(a.escapeSpeed[i]!, Math.sqrt(2 * a.gravitationalPotential[i]!), 1e-15)
      expect(a.effectivePotential[i]!).toBeGreaterThan(a.gravitationalPotential[i]!)
    }
    const { height, meanGravity } = geopotentialHeight(a.effectivePotential, a.effectiveGravity, areas)
    expect(Math.min(...height)).toBe(0)
    expect(meanGravity).toBeGreaterThan(0)
    // the sampled check of the error reports it within the default accuracy
    const idx = sampleIndices(n, 20)
    const est = compareWithDirect(directSamples(mesh, 1000, points, idx), idx, a.gravitationalPotential, null, a.gravity)
    expect(est.samples).toBe(20)
    expect(est.maxRelativePotential).toBeLessThan(1e-8)
    expect(est.maxRelativeGravity).toBeLessThan(1e-7)
  })
})

/** Gauss–Legendre nodes and weights on [0, 1] (Newton on the Legendre recurrence). */
function gaussLegendre01(n: number): { x: number[], w: number[] } {
  const x: number[] = [], w: number[] = []
  for (let i = 1; i <= n; i++) {
    let t = Math.cos((Math.PI * (i - 0.25)) / (n + 0.5))
    let dp = 0
    for (let it = 0; it < 100; it++) {
      let p0 = 1, p1 = t
      for (let k = 2; k <= n; k++) { const p2 = ((2 * k - 1) * t * p1 - (k - 1) * p0) / k; p0 = p1; p1 = p2 }
      dp = (n * (t * p1 - p0)) / (t * t - 1)
      const dt = p1 / dp
      t -= dt
      if (Math.abs(dt) < 1e-16) break
    }
    x.push((t + 1) / 2); w.push(1 / ((1 - t * t) * dp * dp))
  }
  return { x, w }
}
