import { rename, writeFile } from 'node:fs/promises'
import { evaluationPoints, type TriMesh, type Vec3 } from '../../shared/geometry'
import { encodeDisplayMesh } from '../../shared/utils/mesh-binary'

/** Writes through a temporary file and one rename, so readers never see a half-written file. */
export async function writeAtomic(path: string, bytes: Uint8Array) {
  const tmp = `${path}.${process.pid}.${Math.random().toString(36).slice(2)}.tmp`
  await writeFile(tmp, bytes)
  await rename(tmp, path)
}

/** A display copy (float32 relative to its mean vertex), simplified to `budget` faces. */
export async function displayBytes(mesh: TriMesh, budget: number): Promise<Uint8Array> {
  const simplified = mesh.indices.length / 3 > budget ? (await evaluationPoints(mesh, budget)).mesh : mesh
  const P = simplified.positions
  const origin: Vec3 = [0, 0, 0]
  const n = P.length / 3
  for (let i = 0; i < n; i++) for (let d = 0; d < 3; d++) origin[d] += P[3 * i + d] / n
  const f32 = new Float32Array(P.length)
  for (let i = 0; i < P.length; i++) f32[i] = P[i] - origin[i % 3]
  return encodeDisplayMesh({ origin, positions: f32, indices: simplified.indices })
}
