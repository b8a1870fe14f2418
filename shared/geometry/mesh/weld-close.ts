/**
 * Welding of near-duplicate vertices left by float32 booleans.
 */
import type { TriMesh } from '../types'

/**
 * Merge vertices closer than `tol` (m; grid hash, first vertex of a cluster kept) and drop the faces
 * that collapse. Meant for float32 near-duplicates from manifold-3d, far below the mesh spacing.
 */
export function weldClose(mesh: TriMesh, tol: number): TriMesh {
  const P = mesh.positions
  const nv = P.length / 3
  const map = new Int32Array(nv)
  const grid = new Map<string, number[]>()
  const cell = (x: number) => Math.floor(x / tol)
  let kept = 0
  const keep: number[] = []
  for (let v = 0; v < nv; v++) {
    const x = P[3 * v], y = P[3 * v + 1], z = P[3 * v + 2]
    const cx = cell(x), cy = cell(y), cz = cell(z)
    let found = -1
    for (let dx = -1; dx <= 1 && found < 0; dx++) {
      for (let dy = -1; dy <= 1 && found < 0; dy++) {
        for (let dz = -1; dz <= 1 && found < 0; dz++) {
          for (const w of grid.get(`${cx + dx},${cy + dy},${cz + dz}`) ?? []) {
            const o = keep[w]!
            if (Math.hypot(P[3 * o] - x, P[3 * o + 1] - y, P[3 * o + 2] - z) <= tol) { found = w; break }
          }
        }
      }
    }
    if (found < 0) {
      found = kept++
      keep.push(v)
      const key = `${cx},${cy},${cz}`
      const list = grid.get(key)
      if (list) list.push(found)
      else grid.set(key, [found])
    }
    map[v] = found
  }
  if (kept === nv) return mesh
  const positions = new Float64Array(3 * kept)
  keep.forEach((v, i) => { positions[3 * i] = P[3 * v]; positions[3 * i + 1] = P[3 * v + 1]; positions[3 * i + 2] = P[3 * v + 2] })
  const I = mesh.indices
  const out: number[] = []
  for (let t = 0; t < I.length; t += 3) {
    const a = map[I[t]], b = map[I[t + 1]], c = map[I[t + 2]]
    if (a !== b && b !== c && c !== a) out.push(a, b, c)
  }
  return { positions, indices: new Uint32Array(out) }
}
