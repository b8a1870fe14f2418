import { MeshoptSimplifier } from 'meshoptimizer'
import { compactVertices, preparePolyhedron } from '#shared/geometry'
import type { PolyhedronModel, TriMesh, Vec3 } from '#shared/geometry'
import { decodeAnalysisMesh, encodeDisplayMesh } from '../../shared/utils/mesh-binary'
import { useMeshStore } from '../utils/mesh-store'

/** Writes a whole file to the mesh store (readers never see a half-written one). */
export async function storeBytes(key: string, bytes: Uint8Array | string) {
  await (await useMeshStore()).write(key, bytes)
}

// Decoded meshes (and their polyhedron models, built on first use) kept while the worker lives,
// by store key (keys name content: hash and units). A few entries, so that two jobs served
// round-robin on one worker do not reload and re-prepare each other's meshes at every task.
const CACHE_ENTRIES = 4
const cache = new Map<string, { mesh: TriMesh, model?: PolyhedronModel }>()

async function entry(key: string) {
  let e = cache.get(key)
  if (e) {
    cache.delete(key)
    cache.set(key, e)
    return e
  }
  e = { mesh: decodeAnalysisMesh(await (await useMeshStore()).read(key)) }
  if (cache.size >= CACHE_ENTRIES) cache.delete(cache.keys().next().value!)
  cache.set(key, e)
  return e
}

/** The validated analysis mesh (metres, float64) stored under `key`. */
export async function loadAnalysisMesh(key: string): Promise<TriMesh> {
  return (await entry(key)).mesh
}

/** The polyhedron model of the analysis mesh under `key` (prepared once per worker). */
export async function loadModel(key: string): Promise<PolyhedronModel> {
  const e = await entry(key)
  e.model ??= preparePolyhedron(e.mesh)
  return e.model
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
