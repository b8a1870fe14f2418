/**
 * Adapter to three, three-mesh-bvh and meshoptimizer: the only file of the core that imports them.
 * Both libraries work in float32, so callers pass float32 copies (relative to the first vertex
 * where precision matters, see `float32Relative`) and map results back to their float64 meshes.
 */
import { MeshoptSimplifier } from 'meshoptimizer'
import { BufferAttribute, BufferGeometry, Matrix4, Vector3 } from 'three'
import { ExtendedTriangle, MeshBVH } from 'three-mesh-bvh'
import type { MeshBVHOptions } from 'three-mesh-bvh'

export { ExtendedTriangle, Matrix4, MeshBVH, Vector3 }

/**
 * A three-mesh-bvh tree over triangles `indices` of float32 `positions` (both used as given, not
 * copied). Release it with `disposeMeshBvh` when done.
 */
export function buildMeshBvh(positions: Float32Array, indices: Uint32Array, options: MeshBVHOptions): MeshBVH {
  const geometry = new BufferGeometry()
  geometry.setAttribute('position', new BufferAttribute(positions, 3))
  geometry.setIndex(new BufferAttribute(indices, 1))
  return new MeshBVH(geometry, options)
}

/** Frees the three geometry behind a tree of `buildMeshBvh`. */
export function disposeMeshBvh(bvh: MeshBVH): void {
  bvh.geometry.dispose()
}

/** Float32 copy of float64 positions, relative to the first vertex (keeps float32 precision for far-off meshes). */
export function float32Relative(P: Float64Array): Float32Array {
  const f32 = new Float32Array(P.length)
  for (let i = 0; i < P.length; i++) f32[i] = P[i]! - P[i % 3]!
  return f32
}

/**
 * meshoptimizer simplification (`MeshoptSimplifier.simplify`, target error 1, no flags) of the
 * triangles I of P to about `maxFaces` triangles. Returns triangle indices into P's vertices (the
 * unused ones are not removed; see `compactVertices`).
 */
export async function simplifyTriangles(P: Float64Array, I: Uint32Array, maxFaces: number): Promise<Uint32Array> {
  await MeshoptSimplifier.ready
  const [simp] = MeshoptSimplifier.simplify(I, float32Relative(P), 3, Math.floor(maxFaces) * 3, 1, [])
  return simp
}
