import { describe, expect, it } from 'vitest'
import { boxMesh, ContactBvhCache, createRng, ellipsoidMesh, firstContact, icosphere, matVec, meshDistance, perturbedEllipsoid, quatFromAxisAngle, quatMultiply, quatNormalize, quatToMat3, transformMesh, triangleTriangleDistance, triangleTriangleTOI } from '#shared/geometry'
import type { Quat, Vec3 } from '#shared/geometry'

const O: Vec3 = [0, 0, 0]

describe('triangle primitives', () => {
  it('distance of parallel offset triangles is the offset; crossing triangles are at distance 0', () => {
    // Elementary geometry (common practice, no source): parallel planes z=0 and z=0.3 overlapping in xy.
    const A = new Float64Array([0, 0, 0, 1, 0, 0, 0, 1, 0])
    const B = new Float64Array([0.1, 0.1, 0.3, 0.9, 0.1, 0.3, 0.1, 0.9, 0.3])
    const out = new Float64Array(6)
    expect(triangleTriangleDistance(A, 0, B, 0, out)).toBeCloseTo(0.3, 14)
    // A vertical triangle piercing A's interior.
    const C = new Float64Array([0.2, 0.2, -0.5, 0.3, 0.2, 0.5, 0.2, 0.3, 0.5])
    expect(triangleTriangleDistance(A, 0, C, 0, out)).toBe(0)
    // Skew edges: segment x-axis [0,1] at z=0 vs a triangle whose nearest feature is an edge along y at x=0.5, z=0.2.
    const D = new Float64Array([0.5, -1, 0.2, 0.5, 1, 0.2, 0.5, 0, 2])
    expect(triangleTriangleDistance(A, 0, D, 0, out)).toBeCloseTo(0.2, 14)
  })
  it('time of impact of an edge moving onto a crossed edge is the gap (edge–edge event)', () => {
    // Edge along z at x=0 (in A's triangle) and edge along y at x=1 moving along −x: t = 1 exactly.
    const A = new Float64Array([0, 0, -1, 0, 0, 1, -1, 0, 0])
    const B = new Float64Array([1, -1, 0, 1, 1, 0, 2, 0, 0])
    const out = new Float64Array(3)
    expect(triangleTriangleTOI(A, 0, B, 0, -1, 0, 0, 10, out)).toBeCloseTo(1, 14)
    expect(out[0]).toBeCloseTo(0, 14)
  })
})

describe('firstContact', () => {
  it('crossed unit cubes (A turned 45° about z, B 45° about y) touch edge to edge at d = √2', () => {
    // Geometry of the configuration (common practice, no source): each cube reaches √2/2 along x.
    const A = transformMesh(boxMesh(1, 1, 1), quatFromAxisAngle([0, 0, 1], Math.PI / 4))
    const r = firstContact({ meshA: A, meshB: boxMesh(1, 1, 1), centroidA: O, centroidB: O, orientationB: quatFromAxisAngle([0, 1, 0], Math.PI / 4), direction: [1, 0, 0] })
    expect(r.separation).toBeCloseTo(Math.SQRT2, 12)
    expect(r.point[0]).toBeCloseTo(Math.SQRT2 / 2, 12)
    expect(r.normalA[0]).toBeCloseTo(1, 12)
    expect(r.normalB[0]).toBeCloseTo(-1, 12)
  })

  it('two ellipsoids along each principal axis touch at the sum of the semi-axes', () => {
    // Tips are mesh vertices (checked); closed form d = a1 + a2 etc. (common practice, no source).
    const A = ellipsoidMesh(3, 2, 1, 3), B = ellipsoidMesh(1.5, 1.2, 0.5, 3)
    const cache = new ContactBvhCache()
    const want = [4.5, 3.2, 1.5]
    for (let k = 0; k < 3; k++) {
      const dir: Vec3 = [0, 0, 0]; dir[k] = k === 1 ? -1 : 1
      const r = firstContact({ meshA: A, meshB: B, centroidA: O, centroidB: O, direction: dir }, { cache })
      expect(r.separation).toBeCloseTo(want[k], 11)
    }
    expect(cache.builds).toBe(2)
  })

  it('the reported separation is the touching one: just beyond it the surfaces are apart, just inside they cross', () => {
    // Definition of first contact, checked with the independent exact distance (common practice, no source).
    const A = perturbedEllipsoid(1.2, 1, 0.8, 4, 7, 0.08), B = perturbedEllipsoid(0.8, 0.6, 0.5, 4, 9, 0.08)
    const q = quatNormalize([0.9, 0.2, -0.3, 0.1])
    const R = quatToMat3(q)
    const cache = new ContactBvhCache()
    for (const dir of [[1, 0.3, -0.2], [0.1, 1, 0.7], [-0.5, -0.5, 0.2]] as Vec3[]) {
      const r = firstContact({ meshA: A, meshB: B, centroidA: O, centroidB: O, orientationB: q, direction: dir }, { cache })
      const u = r.direction
      const at = (d: number) => meshDistance(cache.get(A), cache.get(B), R, [u[0] * d, u[1] * d, u[2] * d]).distance
      expect(at(r.separation)).toBeLessThan(1e-9)
      expect(at(r.separation + 1e-6)).toBeGreaterThan(0)
      expect(at(r.separation - 1e-6)).toBe(0)
    }
  })

  it('rotating the whole configuration changes nothing (seeded random rotations)', () => {
    // Invariance under a rigid motion (common practice, no source).
    const A = perturbedEllipsoid(1.2, 0.9, 0.8, 3, 3, 0.1), B = perturbedEllipsoid(0.7, 0.6, 0.5, 3, 4, 0.1)
    const qB = quatNormalize([0.8, -0.1, 0.4, 0.3])
    const dir: Vec3 = [0.6, -0.3, 0.5]
    const ref = firstContact({ meshA: A, meshB: B, centroidA: O, centroidB: O, orientationB: qB, direction: dir })
    const rng = createRng(20240611)
    for (let i = 0; i < 4; i++) {
      const Q = quatNormalize([rng.normal(), rng.normal(), rng.normal(), rng.normal()] as Quat)
      const RQ = quatToMat3(Q)
      const shift: Vec3 = [rng.uniform(-5, 5), rng.uniform(-5, 5), rng.uniform(-5, 5)]
      const A2 = transformMesh(A, Q, shift)
      const r = firstContact({ meshA: A2, meshB: B, centroidA: shift, centroidB: O, orientationB: quatMultiply(Q, qB), direction: matVec(RQ, dir) })
      expect(r.separation).toBeCloseTo(ref.separation, 10)
      const p = matVec(RQ, ref.point)
      for (let k = 0; k < 3; k++) expect(r.point[k]).toBeCloseTo(p[k], 9)
    }
  })

  it('two icospheres along a random line touch within the inscribed-mesh sagitta of R1 + R2', () => {
    // Sphere closed form d = R1 + R2; an inscribed icosphere lies within R(1 − cos θ) of the sphere,
    // θ ≈ the edge angle ~ 1.1/2^n rad for n subdivisions (common practice, no source).
    const r = firstContact({ meshA: icosphere(4, 1), meshB: icosphere(4, 0.5), centroidA: O, centroidB: O, direction: [0.3, 0.5, 0.8] })
    const sag = (R: number) => R * (1 - Math.cos(1.1 / 16))
    expect(r.separation).toBeLessThanOrEqual(1.5 + 1e-12)
    expect(r.separation).toBeGreaterThan(1.5 - sag(1) - sag(0.5))
  })
})
