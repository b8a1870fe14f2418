import { describe, expect, it } from 'vitest'
import { createRng, mat3ToQuat, matMul, quatAlignPrincipalFrames, quatFromAxisAngle, quatFromEulerZYXDeg, quatMultiply, quatToMat3, rotateVector, symmetricEigen } from '#shared/geometry'
import type { Mat3 } from '#shared/geometry'

const rz = (a: number): Mat3 => [[Math.cos(a), -Math.sin(a), 0], [Math.sin(a), Math.cos(a), 0], [0, 0, 1]]
const ry = (a: number): Mat3 => [[Math.cos(a), 0, Math.sin(a)], [0, 1, 0], [-Math.sin(a), 0, Math.cos(a)]]
const rx = (a: number): Mat3 => [[1, 0, 0], [0, Math.cos(a), -Math.sin(a)], [0, Math.sin(a), Math.cos(a)]]

describe('quaternions', () => {
  it('90° about z takes x to y (right-hand rule, active rotation)', () => {
    const v = rotateVector(quatFromAxisAngle([0, 0, 1], Math.PI / 2), [1, 0, 0])
    expect(v[0]).toBeCloseTo(0, 15); expect(v[1]).toBeCloseTo(1, 15)
  })
  it('intrinsic z-y′-x″ Euler angles give Rz·Ry·Rx (textbook elementary rotations)', () => {
    const q = quatFromEulerZYXDeg(30, -20, 65)
    const d = Math.PI / 180
    const want = matMul(matMul(rz(30 * d), ry(-20 * d)), rx(65 * d))
    const got = quatToMat3(q)
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(got[i][j]).toBeCloseTo(want[i][j], 14)
  })
  it('matrix ↔ quaternion round trip and product order (seeded random rotations)', () => {
    const rng = createRng(3)
    for (let k = 0; k < 20; k++) {
      const a = quatFromAxisAngle([rng.normal(), rng.normal(), rng.normal()], rng.uniform(-3, 3))
      const b = quatFromAxisAngle([rng.normal(), rng.normal(), rng.normal()], rng.uniform(-3, 3))
      const back = quatToMat3(mat3ToQuat(quatToMat3(a)))
      const m = quatToMat3(a)
      for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(back[i][j]).toBeCloseTo(m[i][j], 13)
      const ab = quatToMat3(quatMultiply(a, b)), want = matMul(quatToMat3(a), quatToMat3(b))
      for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(ab[i][j]).toBeCloseTo(want[i][j], 13)
    }
  })
  it('principal-frame alignment carries B\'s long axis onto A\'s', () => {
    const axesA = symmetricEigen([[1, 0.2, 0], [0.2, 2, 0.1], [0, 0.1, 3]]).vectors
    const axesB = symmetricEigen([[2, -0.3, 0.5], [-0.3, 1, 0], [0.5, 0, 4]]).vectors
    const v = rotateVector(quatAlignPrincipalFrames(axesA, axesB), axesB[0])
    for (let k = 0; k < 3; k++) expect(v[k]).toBeCloseTo(axesA[0][k], 12)
  })
})
