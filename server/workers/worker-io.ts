import { rename, writeFile } from 'node:fs/promises'
import { MeshoptSimplifier } from 'meshoptimizer'
import { compactVertices } from '#shared/geometry'
import type { TriMesh, Vec3 } from '#shared/geometry'
import { encodeDisplayMesh } from '../../shared/utils/mesh-binary'

/** Writes through a temporary file and one rename, so readers never see a half-written file. */
export async function writeAtomic(path: string, bytes: Uint8Array) {
  const tmp = `${path}.${process.pid}.${Math.random().toString(36).slice(2)}.tmp`
  await writeFile(tmp, bytes)
  await rename(tmp, path)
}

/**
 * A display copy (float32 relative to its mean vertex) of at most `budget` faces. Large meshes are
 * reduced with meshoptimizer's clustering simplifier (`simplifySloppy`, ~10× faster than the
 * topology-preserving one): the copy is only drawn, every number comes from the full mesh.
 */
export async function displayBytes(mesh: TriMesh, budget: number): Promise<Uint8Array> {
  const P = mesh.positions
  const origin: Vec3 = [0, 0, 0]
  const nv = P.length / 3
  for (let i = 0; i < nv; i++) for (let d = 0; d < 3; d++) origin[d] += P[3 * i + d] / nv
  const local = new Float32Array(P.length)
  for (let i = 0; i < P.length; i++) local[i] = P[i] - origin[i % 3]
  if (mesh.indices.length / 3 <= budget) return encodeDisplayMesh({ origin, positions: local, indices: mesh.indices })
  await MeshoptSimplifier.ready
  let [indices] = MeshoptSimplifier.simplifySloppy(mesh.indices, local, 3, null, budget * 3, 1)
  if (indices.length / 3 > budget) indices = indices.slice(0, budget * 3)
  const kept = compactVertices(local, indices)
  return encodeDisplayMesh({ origin, positions: kept.positions, indices: kept.indices })
}
