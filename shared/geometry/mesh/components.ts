/**
 * Connected components of a triangle mesh (faces joined through shared vertices).
 */
import type { TriMesh } from '../types'

/**
 * Connected components of faces joined through shared vertices (union-find on vertices).
 * Returns a component label per face (0 .. count−1, in order of first face) and the count.
 */
export function faceComponents(mesh: TriMesh): { label: Uint32Array, count: number } {
  const I = mesh.indices
  const nv = mesh.positions.length / 3
  const parent = vertexRoots(I, nv)
  const label = new Uint32Array(I.length / 3)
  let roots = 0
  for (let v = 0; v < nv; v++) if (parent[v] === v) roots++
  // a single set (the rule on validated meshes, which have no unused vertices): all labels 0
  if (roots === 1) return { label, count: 1 }
  const lab = new Int32Array(nv).fill(-1)
  let count = 0
  for (let f = 0; f < label.length; f++) {
    const r = parent[I[3 * f]!]!
    if (lab[r] === -1) lab[r] = count++
    label[f] = lab[r]!
  }
  return { label, count }
}

/**
 * Union-find over the vertices of faces I: each face joins its three corners; a root is linked
 * under the smaller root (so every root is its set's smallest vertex) and paths are halved on the
 * way. Returns parent with every entry pointing straight at its root.
 */
function vertexRoots(I: Uint32Array, nv: number): Uint32Array {
  const parent = new Uint32Array(nv)
  for (let v = 0; v < nv; v++) parent[v] = v
  for (let i = 0; i < I.length; i += 3) {
    const a = findRoot(parent, I[i]!), b = findRoot(parent, I[i + 1]!), c = findRoot(parent, I[i + 2]!)
    const lo = a < b ? a : b, hi = a < b ? b : a
    if (lo !== hi) parent[hi] = lo
    if (c < lo) parent[lo] = c
    else if (c !== lo) parent[c] = lo
  }
  // roots are the smallest vertex of their set, so one pass in vertex order flattens every path
  for (let v = 0; v < nv; v++) parent[v] = parent[parent[v]!]!
  return parent
}

/** Root of v, halving the path on the way. */
function findRoot(parent: Uint32Array, v: number): number {
  while (parent[v] !== v) { const g = parent[parent[v]!]!; parent[v] = g; v = g }
  return v
}
