/**
 * The core's one symmetric eigen-solver (ml-matrix `EigenvalueDecomposition`, Householder
 * tridiagonalisation + QL, the JAMA/EISPACK tred2/tql2 algorithm).
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix'
import type { Mat3, Vec3 } from '../types'
import { cross } from './linalg'

/**
 * Eigen-decomposition of a symmetric 3×3 matrix: values ascending, vectors as unit ROWS forming a
 * right-handed frame (row 2 = row 0 × row 1).
 *
 * Sign rule: in rows 0 and 1 the component of largest magnitude is positive (on a tie, the first
 * of them); row 2 then follows from the right-hand rule, so its sign is not free. An eigenvector is
 * otherwise defined only up to its sign, i.e. the frame only up to 180° turns about its axes, and
 * for repeated eigenvalues only up to a rotation within their eigenspace.
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
