/** Small dense 3×3 helpers (rows first) and the symmetric eigen-decomposition (ml-matrix). */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix'
import type { Mat3, Vec3 } from './types'

export function det3(m: Mat3): number {
  const [a, b, c] = m
  return a[0] * (b[1] * c[2] - b[2] * c[1]) - a[1] * (b[0] * c[2] - b[2] * c[0]) + a[2] * (b[0] * c[1] - b[1] * c[0])
}
export function matVec(m: Mat3, v: Vec3): Vec3 {
  return [m[0][0] * v[0] + m[0][1] * v[1] + m[0][2] * v[2], m[1][0] * v[0] + m[1][1] * v[1] + m[1][2] * v[2], m[2][0] * v[0] + m[2][1] * v[1] + m[2][2] * v[2]]
}
export function matMul(a: Mat3, b: Mat3): Mat3 {
  const r: number[][] = [[0, 0, 0], [0, 0, 0], [0, 0, 0]]
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) r[i]![j] = a[i]![0] * b[0]![j]! + a[i]![1] * b[1]![j]! + a[i]![2] * b[2]![j]!
  return r as Mat3
}
export function transpose(m: Mat3): Mat3 {
  return [[m[0][0], m[1][0], m[2][0]], [m[0][1], m[1][1], m[2][1]], [m[0][2], m[1][2], m[2][2]]]
}
export function cross(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]]
}

/**
 * Eigen-decomposition of a symmetric 3×3 matrix: values ascending, vectors as unit ROWS forming a
 * right-handed frame (row 2 = row 0 × row 1). Sign convention: the largest-magnitude component of
 * rows 0 and 1 is positive (the frame is otherwise defined only up to 180° turns about its axes).
 */
export function symmetricEigen(m: Mat3): { values: Vec3, vectors: Mat3 } {
  const evd = new EigenvalueDecomposition(new Matrix(m.map(r => [...r])), { assumeSymmetric: true })
  const vals = evd.realEigenvalues
  const V = evd.eigenvectorMatrix
  const order = [0, 1, 2].sort((i, j) => vals[i]! - vals[j]!)
  const rows = order.map((k) => {
    const v: Vec3 = [V.get(0, k), V.get(1, k), V.get(2, k)]
    const n = Math.hypot(...v)
    let big = 0
    for (let i = 1; i < 3; i++) if (Math.abs(v[i]!) > Math.abs(v[big]!)) big = i
    const s = (v[big]! < 0 ? -1 : 1) / n
    return [v[0] * s, v[1] * s, v[2] * s] as Vec3
  })
  const r2 = cross(rows[0]!, rows[1]!)
  return { values: order.map(k => vals[k]!) as Vec3, vectors: [rows[0]!, rows[1]!, r2] }
}
