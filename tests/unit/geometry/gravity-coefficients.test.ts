import { describe, expect, it } from 'vitest'
import { coefficientsFromSums, coefficientSums, degreeVariances, ellipsoidMesh, gravityCoefficients, kaulaNormalization, massProperties, perturbedEllipsoid, potential, preparePolyhedron, seriesPotential, transformMesh } from '#shared/geometry'
import type { CoefficientFrame } from '#shared/geometry'
import { close } from './helpers'
import { ellipsoidCoefficient } from './gravity-references'

const FILE_AXES: CoefficientFrame['axes'] = [[1, 0, 0], [0, 1, 0], [0, 0, 1]]

describe('gravity-field coefficients of a homogeneous polyhedron (exact per signed tetrahedron)', () => {
  it('closed forms of the ellipsoid series: J2 = (a²+b²−2c²)/(10R²), C22 = (a²−b²)/(20R²) (Balmino 1994, Celest. Mech. Dyn. Astron. 60 [pub]) and the degree-4 terms [derived from the ball moments] agree with the term-by-term reference', () => {
    const [a, b, c, R] = [3, 2, 1.2, 2.1]
    close(-ellipsoidCoefficient(a, b, c, R, 2, 0).C, (a * a + b * b - 2 * c * c) / (10 * R * R), 1e-14)
    close(ellipsoidCoefficient(a, b, c, R, 2, 2).C, (a * a - b * b) / (20 * R * R), 1e-14)
    // degree 4, derived by hand from the ball moments <u⁴> = 3/35, <u²v²> = 1/35 (Folland 2001):
    // C40 = 3(3a⁴+3b⁴+8c⁴+2a²b²−8a²c²−8b²c²)/(280R⁴), C42 = (a²−b²)(2c²−a²−b²)/(280R⁴), C44 = (a²−b²)²/(2240R⁴)
    const [a2, b2, c2, R4] = [a * a, b * b, c * c, R ** 4]
    close(ellipsoidCoefficient(a, b, c, R, 4, 0).C, (3 * (3 * a2 * a2 + 3 * b2 * b2 + 8 * c2 * c2 + 2 * a2 * b2 - 8 * a2 * c2 - 8 * b2 * c2)) / (280 * R4), 1e-13)
    close(ellipsoidCoefficient(a, b, c, R, 4, 2).C, ((a2 - b2) * (2 * c2 - a2 - b2)) / (280 * R4), 1e-13)
    close(ellipsoidCoefficient(a, b, c, R, 4, 4).C, ((a2 - b2) ** 2) / (2240 * R4), 1e-13)
  })

  it('a fine ellipsoid mesh against the ellipsoid series, degrees 2, 4, 6, to the mesh\'s discretisation error (and converging with refinement)', () => {
    const [a, b, c] = [1500, 1000, 800]
    const R = 1100
    const frame: CoefficientFrame = { kind: 'file', origin: [0, 0, 0], axes: FILE_AXES }
    const errs: number[] = []
    for (const sub of [4, 5]) {
      const mesh = ellipsoidMesh(a, b, c, sub)
      const co = gravityCoefficients(mesh, { degree: 6, referenceRadius: R, density: 1000, frame: { ...frame, origin: massProperties(mesh, { density: 1000 }).centroid } })
      let worst = 0
      for (const l of [2, 4, 6]) {
        for (let m = 0; m <= l; m += 2) {
          const ref = ellipsoidCoefficient(a, b, c, R, l, m).C
          worst = Math.max(worst, Math.abs(co.C[l]![m]! - ref) / Math.abs(ref))
        }
      }
      // odd degrees and orders vanish by symmetry, S too
      for (let l = 1; l <= 6; l++) for (let m = 0; m <= l; m++) {
        if (l % 2 === 1 || m % 2 === 1) expect(Math.abs(co.C[l]![m]!)).toBeLessThan(1e-12)
        expect(Math.abs(co.S[l]![m]!)).toBeLessThan(1e-12)
      }
      errs.push(worst)
    }
    // inscribed icospheres: O(h²) — about 4× smaller per subdivision; 20 480 faces: below 3e-3
    expect(errs[1]!).toBeLessThan(3e-3)
    expect(errs[1]!).toBeLessThan(errs[0]! / 3)
  })

  it('degree 2 equals MacCullagh from the inertia tensor to 1e-12 (docs/harmonics.md), in the file frame with all five terms non-zero', () => {
    const mesh = transformMesh(perturbedEllipsoid(1500, 1000, 800, 3, 11, 0.2), [0.8, 0.2, -0.4, 0.4], [3000, -1000, 500])
    const mp = massProperties(mesh, { density: 1500 })
    const R = mp.equivalentRadius
    const co = gravityCoefficients(mesh, { degree: 4, referenceRadius: R, density: 1500, frame: { kind: 'file', origin: mp.centroid, axes: FILE_AXES } })
    const I = mp.inertia, MR2 = mp.mass * R * R
    const mac = {
      C20: (I[0][0] + I[1][1] - 2 * I[2][2]) / (2 * MR2), C22: (I[1][1] - I[0][0]) / (4 * MR2),
      C21: -I[0][2] / MR2, S21: -I[1][2] / MR2, S22: -I[0][1] / (2 * MR2),
    }
    const scale = Math.abs(mac.C20)
    close(co.C[2]![0]!, mac.C20, 0, 1e-12 * scale)
    close(co.C[2]![2]!, mac.C22, 0, 1e-12 * scale)
    close(co.C[2]![1]!, mac.C21, 0, 1e-12 * scale)
    close(co.S[2]![1]!, mac.S21, 0, 1e-12 * scale)
    close(co.S[2]![2]!, mac.S22, 0, 1e-12 * scale)
    for (const v of Object.values(mac)) expect(Math.abs(v)).toBeGreaterThan(1e-4)
    // degree 1 vanishes about the centroid; GM from the volume
    for (const v of [co.C[1]![0]!, co.C[1]![1]!, co.S[1]![1]!]) expect(Math.abs(v)).toBeLessThan(1e-13)
    close(co.GM, mp.G * mp.mass, 1e-12)
    // principal frame: C21 = S21 = S22 = 0, C22 ≥ 0, and J2 matches mass properties (4π-normalised C̄20 = C20/√5)
    const pr = gravityCoefficients(mesh, { degree: 4, referenceRadius: mp.referenceRadius, density: 1500, frame: { kind: 'principal', origin: mp.centroid, axes: mp.rotationToPrincipal } })
    for (const v of [pr.C[2]![1]!, pr.S[2]![1]!, pr.S[2]![2]!]) expect(Math.abs(v)).toBeLessThan(1e-13)
    close(-pr.C[2]![0]!, mp.J2, 1e-12)
    close(pr.C[2]![2]!, mp.C22, 1e-12)
    close(pr.Cbar[2]![0]!, pr.C[2]![0]! / Math.sqrt(5), 1e-14)
    close(pr.Cbar[2]![2]!, pr.C[2]![2]! / Math.sqrt(5 / 12), 1e-14) // docs/conventions.md [pub: SHTOOLS documentation]
    // the degree ≤ 4 moments route of mass properties (an independent implementation)
    for (let l = 3; l <= 4; l++) for (let m = 0; m <= l; m++) {
      close(pr.C[l]![m]!, mp.harmonics.C[l]![m]!, 1e-9, 1e-14)
      close(pr.S[l]![m]!, mp.harmonics.S[l]![m]!, 1e-9, 1e-14)
    }
  })

  it('the series converges to the polyhedron potential (Werner & Scheeres 1997) outside the circumscribing sphere as the degree rises', () => {
    const mesh = perturbedEllipsoid(1500, 1000, 800, 3, 7, 0.15)
    const mp = massProperties(mesh, { density: 1000 })
    const co = gravityCoefficients(mesh, { degree: 24, referenceRadius: mp.maxRadius, density: 1000, frame: { kind: 'principal', origin: mp.centroid, axes: mp.rotationToPrincipal } })
    const model = preparePolyhedron(mesh)
    const Rm = mp.rotationToPrincipal
    for (const dir of [[1, 0.3, 0.2], [-0.2, 1, 0.5], [0.1, -0.3, -1]] as const) {
      const n = Math.hypot(...dir)
      const d = dir.map(v => (v / n) * 1.5 * mp.maxRadius)
      const U = potential(model, 1000, [mp.centroid[0] + d[0]!, mp.centroid[1] + d[1]!, mp.centroid[2] + d[2]!])
      const q = Rm.map(r => r[0] * d[0]! + r[1] * d[1]! + r[2] * d[2]!) as [number, number, number]
      const err = [2, 8, 16, 24].map(L => Math.abs(seriesPotential(co, q[0], q[1], q[2], L) - U) / U)
      for (let i = 1; i < err.length; i++) expect(err[i]!).toBeLessThan(err[i - 1]!)
      expect(err[3]!).toBeLessThan(1e-6)
    }
  })

  it('sums over face ranges add up to the whole (worker chunks), and degree 32 stays finite', () => {
    const mesh = perturbedEllipsoid(1500, 1000, 800, 3, 4, 0.1)
    const frame: CoefficientFrame = { kind: 'file', origin: massProperties(mesh, { density: 1 }).centroid, axes: FILE_AXES }
    const nf = mesh.indices.length / 3
    const whole = coefficientSums(mesh, frame, 1200, 32)
    const parts = coefficientSums(mesh, frame, 1200, 32, 0, 500)
    coefficientSums(mesh, frame, 1200, 32, 500, nf, parts)
    for (let i = 0; i < whole.length; i++) close(parts[i]!, whole[i]!, 1e-12, 1e-12 * Math.abs(whole[0]!))
    const co = coefficientsFromSums(whole, 32, 1200, 1000, frame)
    expect(co.Cbar[32]!.every(Number.isFinite)).toBe(true)
    const dv = degreeVariances(co)
    expect(dv[2]!).toBeGreaterThan(dv[20]!)
    close(kaulaNormalization(2, 2), Math.sqrt(5 / 12), 1e-15)
  })
})
