import { describe, expect, it } from 'vitest'
import { boxMesh, ellipsoidMesh, GeometryError, icosphere, massProperties, mergeMeshes, perturbedEllipsoid, transformMesh, twoSphereBody, validateMesh } from '#shared/geometry'
import { axisAngle, close } from './helpers'

describe('generators', () => {
  it('icosphere has 20·4^n faces and 10·4^n+2 vertices, closed and outward (volume > 0)', () => {
    for (let n = 0; n <= 4; n++) {
      const m = icosphere(n, 2)
      expect(m.indices.length / 3).toBe(20 * 4 ** n)
      expect(m.positions.length / 3).toBe(10 * 4 ** n + 2)
      const { report } = validateMesh(m)
      expect(report.flippedFaces).toBe(0)
      expect(report.invertedOrientation).toBe(false)
      expect(report.components).toBe(1)
      expect(report.volume).toBeGreaterThan(0)
    }
  })
  it('is deterministic (same arguments → identical bytes)', () => {
    expect(perturbedEllipsoid(3, 2, 1, 3, 42, 0.2).positions).toEqual(perturbedEllipsoid(3, 2, 1, 3, 42, 0.2).positions)
    expect(perturbedEllipsoid(3, 2, 1, 3, 42, 0.2).positions).not.toEqual(perturbedEllipsoid(3, 2, 1, 3, 43, 0.2).positions)
  })
  it('two-sphere body: closed, outward, one component; volume → V1 + V2 − lens as it is refined', () => {
    // Lens of two spheres at distance d: V = π(R1 + R2 − d)²(d² + 2d(R1 + R2) − 3(R1 − R2)²)/(12d)
    // (Weisstein, MathWorld "Sphere-Sphere Intersection").
    const [r1, r2, d] = [1, 0.6, 1.4]
    const lens = Math.PI * (r1 + r2 - d) ** 2 * (d * d + 2 * d * (r1 + r2) - 3 * (r1 - r2) ** 2) / (12 * d)
    const exact = (4 / 3) * Math.PI * (r1 ** 3 + r2 ** 3) - lens
    let lastError = Infinity
    for (const around of [24, 48, 96]) {
      const { report } = validateMesh(twoSphereBody(r1, r2, d, around))
      expect(report.components).toBe(1)
      expect(report.flippedFaces).toBe(0)
      expect(report.invertedOrientation).toBe(false)
      const error = (exact - report.volume) / exact
      // Inscribed: low by about (2π/around)²/6 per direction (second-order chord error), with
      // coarser steps near the poles and the neck ring: allow three times that.
      expect(error).toBeGreaterThan(0)
      expect(error).toBeLessThan(3 * (2 * Math.PI / around) ** 2 / 6)
      expect(error).toBeLessThan(lastError / 3)
      lastError = error
    }
    expect(() => twoSphereBody(1, 0.6, 2, 24)).toThrow(GeometryError)
  })
  it('box: 12 outward triangles, volume lx·ly·lz', () => {
    const b = boxMesh(1, 2, 3, [5, 6, 7])
    expect(b.indices.length).toBe(36)
    const { report } = validateMesh(b)
    expect(report.flippedFaces).toBe(0)
    close(report.volume, 6, 1e-14)
  })
  it('perturbed ellipsoid is a valid closed star-shaped lobe', () => {
    const { report } = validateMesh(perturbedEllipsoid(3, 2, 1, 4, 7, 0.3))
    expect(report.flippedFaces + report.invertedComponents + report.selfIntersections.count).toBe(0)
    expect(() => perturbedEllipsoid(1, 1, 1, 2, 1, 1)).toThrow(GeometryError)
  })
  it('transformMesh rotates (quaternion = matrix) and keeps winding under reflection', () => {
    const e = ellipsoidMesh(3, 2, 1, 2)
    const q: [number, number, number, number] = [Math.cos(0.35), Math.sin(0.35), 0, 0]
    const a = transformMesh(e, q, [1, 2, 3]).positions
    const b = transformMesh(e, axisAngle([1, 0, 0], 0.7), [1, 2, 3]).positions
    for (let i = 0; i < a.length; i++) close(a[i]!, b[i]!, 0, 1e-12)
    const mirrored = transformMesh(e, [[-1, 0, 0], [0, 1, 0], [0, 0, 1]], [0, 0, 0])
    expect(massProperties(mirrored, { density: 1 }).volume).toBeGreaterThan(0)
  })
  it('mergeMeshes concatenates with index offsets', () => {
    const m = mergeMeshes([boxMesh(1, 1, 1), boxMesh(1, 1, 1, [3, 0, 0])])
    expect(m.indices.length).toBe(72)
    expect(Math.max(...m.indices)).toBe(15)
    expect(validateMesh(m).report.components).toBe(2)
  })
})
