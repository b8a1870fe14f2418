/**
 * Small mesh helpers shared by the simplification paths (surface fields, mutual potential, display
 * copies): keep only the vertices a subset of triangles uses, and a face's centroid and unit normal.
 */
import type { TriMesh } from '../types'

/**
 * The vertices referenced by `indices` (which index `positions`), renumbered in first-use order.
 * Works for Float64Array and Float32Array positions; the output has the same array type.
 */
export function compactVertices<P extends Float64Array | Float32Array>(positions: P, indices: ArrayLike<number>): { positions: P, indices: Uint32Array } {
  const nv = positions.length / 3
  const map = new Int32Array(nv).fill(-1)
  let used = 0
  const out = new Uint32Array(indices.length)
  for (let i = 0; i < indices.length; i++) {
    const v = indices[i]!
    if (map[v] === -1) map[v] = used++
    out[i] = map[v]!
  }
  const pos = new (positions.constructor as { new (n: number): P })(3 * used)
  for (let v = 0; v < nv; v++) {
    const u = map[v]!
    if (u >= 0) { pos[3 * u] = positions[3 * v]!; pos[3 * u + 1] = positions[3 * v + 1]!; pos[3 * u + 2] = positions[3 * v + 2]! }
  }
  return { positions: pos, indices: out }
}

/**
 * Writes face `f`'s centroid into points[3k..] and unit outward normal into normals[3k..] (left as
 * is for a zero-area face). Returns the face area, m².
 */
export function faceCentroidNormal(mesh: TriMesh, f: number, points: Float64Array, normals: Float64Array, k: number): number {
  const P = mesh.positions, I = mesh.indices
  const a = 3 * I[3 * f]!, b = 3 * I[3 * f + 1]!, c = 3 * I[3 * f + 2]!
  for (let d = 0; d < 3; d++) points[3 * k + d] = (P[a + d]! + P[b + d]! + P[c + d]!) / 3
  const ux = P[b]! - P[a]!, uy = P[b + 1]! - P[a + 1]!, uz = P[b + 2]! - P[a + 2]!
  const wx = P[c]! - P[a]!, wy = P[c + 1]! - P[a + 1]!, wz = P[c + 2]! - P[a + 2]!
  const nx = uy * wz - uz * wy, ny = uz * wx - ux * wz, nz = ux * wy - uy * wx
  const n = Math.hypot(nx, ny, nz)
  if (n > 0) { normals[3 * k] = nx / n; normals[3 * k + 1] = ny / n; normals[3 * k + 2] = nz / n }
  return n / 2
}
