/**
 * Contact BVHs: a three-mesh-bvh tree (`MeshBVH`, built once per mesh with `indirect: true`, so
 * the mesh's index order is kept) copied into float64 arrays with bounds recomputed from the
 * float64 vertices (the library stores float32 bounds), and a cache of them.
 */
import type { TriMesh } from '../types'
import { GeometryError } from '../types'
import { buildMeshBvh, disposeMeshBvh } from '../adapters/three'

// ============================================================ BVH copy and cache

/** A float64 copy of a three-mesh-bvh tree over one mesh, with triangles stored in leaf order. */
export interface ContactBvh {
  readonly mesh: TriMesh
  /** Node boxes, 6 per node: minX, minY, minZ, maxX, maxY, maxZ (mesh file frame, m). */
  readonly box: Float64Array
  /** Left / right child node index, −1 for a leaf. */
  readonly left: Int32Array
  readonly right: Int32Array
  /** First triangle (leaf order) and triangle count of a leaf. */
  readonly start: Int32Array
  readonly count: Int32Array
  /** Triangle vertex coordinates in leaf order, 9 per triangle. */
  readonly tri: Float64Array
  /** Original face index of each leaf-order triangle. */
  readonly face: Uint32Array
  /** Unit outward normal of each leaf-order triangle, 3 per triangle. */
  readonly normal: Float64Array
  /** Milliseconds spent building (library build + copy). */
  readonly buildMs: number
}

function checkMesh(mesh: TriMesh, what: string): void {
  if (!(mesh.positions instanceof Float64Array) || !(mesh.indices instanceof Uint32Array))
    throw new GeometryError('bad-mesh', `${what}: positions must be Float64Array and indices Uint32Array`)
  if (mesh.indices.length === 0 || mesh.indices.length % 3 !== 0)
    throw new GeometryError('bad-mesh', `${what}: index count ${mesh.indices.length} is not a positive multiple of 3`)
  const nv = mesh.positions.length / 3
  for (let i = 0; i < mesh.indices.length; i++) {
    if (mesh.indices[i] >= nv) throw new GeometryError('bad-mesh', `${what}: face ${Math.floor(i / 3)} refers to vertex ${mesh.indices[i]} of ${nv}`)
  }
}

/** Build the float64 contact BVH of a mesh (three-mesh-bvh `MeshBVH`, `indirect: true`). */
export function buildContactBvh(mesh: TriMesh): ContactBvh {
  checkMesh(mesh, 'buildContactBvh')
  const t0 = performance.now()
  const bvh = buildMeshBvh(new Float32Array(mesh.positions), mesh.indices, { indirect: true, targetLeafSize: 8, maxDepth: 64 })
  // Rebuild the tree topology from the pre-order traversal (left child first).
  const left: number[] = []
  const right: number[] = []
  const start: number[] = []
  const count: number[] = []
  const stack: number[] = []
  let leafTris = 0
  const order: number[] = []
  bvh.traverse((depth: number, isLeaf: boolean, _b: unknown, offset?: number, cnt?: number) => {
    const id = left.length
    left.push(-1); right.push(-1); start.push(0); count.push(0)
    if (depth > 0) {
      const parent = stack[depth - 1]
      if (left[parent] === -1) left[parent] = id
      else right[parent] = id
    }
    stack[depth] = id
    if (isLeaf) {
      start[id] = leafTris
      count[id] = cnt!
      for (let i = 0; i < cnt!; i++) order.push(bvh.resolveTriangleIndex(offset! + i))
      leafTris += cnt!
    }
    return false
  })
  const nNodes = left.length
  const nTri = order.length
  if (nTri !== mesh.indices.length / 3) throw new GeometryError('bvh-failed', `buildContactBvh: tree holds ${nTri} of ${mesh.indices.length / 3} faces`)
  const P = mesh.positions
  const I = mesh.indices
  const tri = new Float64Array(9 * nTri)
  const normal = new Float64Array(3 * nTri)
  const face = new Uint32Array(order)
  for (let k = 0; k < nTri; k++) {
    const f = order[k]
    for (let v = 0; v < 3; v++) {
      const vi = I[3 * f + v]
      tri[9 * k + 3 * v] = P[3 * vi]; tri[9 * k + 3 * v + 1] = P[3 * vi + 1]; tri[9 * k + 3 * v + 2] = P[3 * vi + 2]
    }
    const o = 9 * k
    const ux = tri[o + 3] - tri[o]; const uy = tri[o + 4] - tri[o + 1]; const uz = tri[o + 5] - tri[o + 2]
    const vx = tri[o + 6] - tri[o]; const vy = tri[o + 7] - tri[o + 1]; const vz = tri[o + 8] - tri[o + 2]
    let nx = uy * vz - uz * vy; let ny = uz * vx - ux * vz; let nz = ux * vy - uy * vx
    const nl = Math.hypot(nx, ny, nz) || 1
    nx /= nl; ny /= nl; nz /= nl
    normal[3 * k] = nx; normal[3 * k + 1] = ny; normal[3 * k + 2] = nz
  }
  const box = new Float64Array(6 * nNodes)
  const L = Int32Array.from(left)
  const R = Int32Array.from(right)
  const S = Int32Array.from(start)
  const C = Int32Array.from(count)
  // Pre-order ⇒ children have larger ids: fill boxes from the last node backwards.
  for (let n = nNodes - 1; n >= 0; n--) {
    const b = 6 * n
    box[b] = box[b + 1] = box[b + 2] = Infinity
    box[b + 3] = box[b + 4] = box[b + 5] = -Infinity
    if (L[n] === -1) {
      for (let k = S[n]; k < S[n] + C[n]; k++) {
        for (let v = 0; v < 3; v++) {
          for (let a = 0; a < 3; a++) {
            const x = tri[9 * k + 3 * v + a]
            if (x < box[b + a]) box[b + a] = x
            if (x > box[b + 3 + a]) box[b + 3 + a] = x
          }
        }
      }
    }
    else {
      for (const ch of [L[n], R[n]]) {
        for (let a = 0; a < 3; a++) {
          if (box[6 * ch + a] < box[b + a]) box[b + a] = box[6 * ch + a]
          if (box[6 * ch + 3 + a] > box[b + 3 + a]) box[b + 3 + a] = box[6 * ch + 3 + a]
        }
      }
    }
  }
  disposeMeshBvh(bvh)
  return { mesh, box, left: L, right: R, start: S, count: C, tri, face, normal, buildMs: performance.now() - t0 }
}

/**
 * Cache of contact BVHs. `get(mesh, key?)`: with a key (e.g. a mesh content hash) the BVH is kept
 * under that key (call `delete(key)` or `clear()` to release it); without one it is kept in a
 * WeakMap on the mesh object and released with the mesh.
 */
export class ContactBvhCache {
  private readonly byMesh = new WeakMap<TriMesh, ContactBvh>()
  private readonly byKey = new Map<string, ContactBvh>()
  /** Number of BVHs built by this cache (for tests and benchmarks). */
  builds = 0
  get(mesh: TriMesh, key?: string): ContactBvh {
    const hit = key !== undefined ? this.byKey.get(key) : this.byMesh.get(mesh)
    if (hit && hit.mesh.positions.length === mesh.positions.length && hit.mesh.indices.length === mesh.indices.length) return hit
    const bvh = buildContactBvh(mesh)
    this.builds++
    if (key !== undefined) this.byKey.set(key, bvh)
    else this.byMesh.set(mesh, bvh)
    return bvh
  }

  delete(key: string): void { this.byKey.delete(key) }
  clear(): void { this.byKey.clear() }
}
