/**
 * Mesh booleans for contact studies on manifold-3d (through adapters/manifold.ts): overlap lens
 * and union of two placed lobes, plane split, volume. Every WASM object is freed with `.delete()`
 * in a `finally`.
 */
import type { TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import { fromManifold, loadManifold, toManifold, unitFrameOf } from '../adapters/manifold'
import type { ManifoldT } from '../adapters/manifold'
import { applyPose } from '../contact/first-contact'
import { normalize } from '../math/linalg'
import { weldClose } from '../mesh/weld-close'

export interface OverlapResult {
  /** Union of A and the moved B, contact frame, m. */
  union: TriMesh
  /** Intersection (overlap lens), contact frame, m; empty mesh when there is no overlap. */
  intersection: TriMesh
  /** Volumes, m³ (manifold-3d, float32 positions in unit space). */
  unionVolume: number
  overlapVolume: number
  /** B's placement after the extra overlap (B file → contact frame). */
  poseB: { quaternion: [number, number, number, number], translation: Vec3 }
  overlapDepth: number
}

/**
 * Union and intersection of A (already in the contact frame) and B placed by `poseB` and moved a
 * further `overlapDepth` (m, ≥ 0) toward A along −direction.
 * @throws GeometryError('not-manifold') if either mesh is not a closed manifold,
 *   ('bad-input') for a negative overlap depth.
 */
export async function overlapAndUnion(
  meshAContact: TriMesh,
  meshB: TriMesh,
  poseB: { quaternion: [number, number, number, number], translation: Vec3 },
  direction: Vec3,
  overlapDepth: number,
): Promise<OverlapResult> {
  if (!(overlapDepth >= 0) || !Number.isFinite(overlapDepth)) throw new GeometryError('bad-input', 'overlapAndUnion: overlapDepth must be ≥ 0', [{ path: 'overlapDepth', message: 'must be ≥ 0' }])
  const wasm = await loadManifold()
  const u = normalize(direction)
  const pose = { quaternion: poseB.quaternion, translation: [poseB.translation[0] - u[0] * overlapDepth, poseB.translation[1] - u[1] * overlapDepth, poseB.translation[2] - u[2] * overlapDepth] as Vec3 }
  const placedB = applyPose(meshB, pose)
  const f = unitFrameOf([meshAContact, placedB])
  let a: ManifoldT | null = null, b: ManifoldT | null = null, un: ManifoldT | null = null, is: ManifoldT | null = null
  try {
    a = toManifold(wasm, meshAContact, f, 'overlapAndUnion (lobe A)')
    b = toManifold(wasm, placedB, f, 'overlapAndUnion (lobe B)')
    un = a.add(b)
    is = a.intersect(b)
    for (const [m, w] of [[un, 'union'], [is, 'intersection']] as const) {
      const st = m.status()
      if (st !== 'NoError') throw new GeometryError('boolean-failed', `overlapAndUnion: ${w} failed (manifold-3d status ${st})`)
    }
    const s3 = f.s ** 3
    return {
      union: fromManifold(un, f),
      intersection: is.isEmpty() ? { positions: new Float64Array(0), indices: new Uint32Array(0) } : fromManifold(is, f),
      unionVolume: un.volume() * s3,
      overlapVolume: is.isEmpty() ? 0 : is.volume() * s3,
      poseB: pose,
      overlapDepth,
    }
  }
  finally {
    a?.delete(); b?.delete(); un?.delete(); is?.delete()
  }
}

/**
 * Cut a closed mesh by the plane {x : x·n = offset} (n unit) into the part on the +n side and the
 * part on the −n side, both closed (manifold-3d `splitByPlane`). Volumes in m³.
 * @throws GeometryError('not-manifold'), ('empty-part') when the plane misses the body.
 */
export async function splitMeshByPlane(mesh: TriMesh, normal: Vec3, offset: number): Promise<{ positive: TriMesh, negative: TriMesh, positiveVolume: number, negativeVolume: number }> {
  const wasm = await loadManifold()
  const n = normalize(normal, 'splitMeshByPlane: normal')
  const f = unitFrameOf([mesh])
  // Plane in unit space: n·(x s + c) = offset ⇒ n·x = (offset − n·c)/s.
  const off = (offset - (n[0] * f.c[0] + n[1] * f.c[1] + n[2] * f.c[2])) / f.s
  let m: ManifoldT | null = null, pos: ManifoldT | null = null, neg: ManifoldT | null = null
  try {
    m = toManifold(wasm, mesh, f, 'splitMeshByPlane')
    const parts = m.splitByPlane(n, off)
    pos = parts[0]; neg = parts[1]
    if (pos.isEmpty() || neg.isEmpty()) throw new GeometryError('empty-part', 'splitMeshByPlane: the plane does not cut the body into two parts')
    const s3 = f.s ** 3
    // A plane through mesh vertices leaves float32 near-duplicates on the cut (needle faces of zero
    // area, which upload validation refuses): weld vertices closer than 1e-6 of the half-size.
    const weld = 1e-6 * f.s
    return { positive: weldClose(fromManifold(pos, f), weld), negative: weldClose(fromManifold(neg, f), weld), positiveVolume: pos.volume() * s3, negativeVolume: neg.volume() * s3 }
  }
  finally {
    m?.delete(); pos?.delete(); neg?.delete()
  }
}

/** Volume of a closed mesh by manifold-3d (m³), for cross-checks. */
export async function manifoldVolume(mesh: TriMesh): Promise<number> {
  const wasm = await loadManifold()
  const f = unitFrameOf([mesh])
  let m: ManifoldT | null = null
  try {
    m = toManifold(wasm, mesh, f, 'manifoldVolume')
    return m.volume() * f.s ** 3
  }
  finally { m?.delete() }
}
