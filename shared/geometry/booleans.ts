/**
 * Mesh booleans for contact studies, on manifold-3d (WASM). The module is loaded once
 * (`loadManifold()`); every WASM object is freed with `.delete()` in a `finally`.
 *
 * Precision: manifold-3d stores vertices as float32. Meshes are centred and scaled to unit size
 * before they go in and mapped back to float64 metres after, so the relative precision is ~1e-7 of
 * the configuration size whatever the absolute coordinates.
 */
import Module from 'manifold-3d'
import type { ManifoldToplevel, Manifold as ManifoldT } from 'manifold-3d'
import type { TriMesh, Vec3 } from './types'
import { GeometryError } from './types'
import { applyPose } from './contact'
import { normalize } from './quat'

let loading: Promise<ManifoldToplevel> | null = null

/** The manifold-3d module, instantiated and set up once per process (or worker). */
export function loadManifold(): Promise<ManifoldToplevel> {
  if (!loading) {
    loading = Module().then((m) => {
      m.setup()
      return m
    })
  }
  return loading
}

/** Common centring/scaling of a set of meshes into manifold's float32 space. */
interface UnitFrame { c: Vec3, s: number }

function unitFrameOf(meshes: TriMesh[]): UnitFrame {
  const lo = [Infinity, Infinity, Infinity], hi = [-Infinity, -Infinity, -Infinity]
  for (const m of meshes) {
    const P = m.positions
    for (let i = 0; i < P.length; i += 3) {
      for (let k = 0; k < 3; k++) {
        if (P[i + k] < lo[k]) lo[k] = P[i + k]
        if (P[i + k] > hi[k]) hi[k] = P[i + k]
      }
    }
  }
  const c: Vec3 = [(lo[0] + hi[0]) / 2, (lo[1] + hi[1]) / 2, (lo[2] + hi[2]) / 2]
  const s = Math.max(hi[0] - lo[0], hi[1] - lo[1], hi[2] - lo[2]) / 2 || 1
  return { c, s }
}

function toManifold(wasm: ManifoldToplevel, mesh: TriMesh, f: UnitFrame, what: string): ManifoldT {
  const P = mesh.positions
  const vp = new Float32Array(P.length)
  for (let i = 0; i < P.length; i += 3) {
    vp[i] = (P[i] - f.c[0]) / f.s; vp[i + 1] = (P[i + 1] - f.c[1]) / f.s; vp[i + 2] = (P[i + 2] - f.c[2]) / f.s
  }
  const m = new wasm.Mesh({ numProp: 3, vertProperties: vp, triVerts: new Uint32Array(mesh.indices) })
  m.merge()
  const man = new wasm.Manifold(m)
  const st = man.status()
  if (st !== 'NoError') {
    man.delete()
    throw new GeometryError('NOT_MANIFOLD', `${what}: mesh is not a closed 2-manifold (manifold-3d status ${st})`)
  }
  return man
}

function fromManifold(man: ManifoldT, f: UnitFrame): TriMesh {
  const m = man.getMesh()
  const np = m.numProp
  const nv = m.vertProperties.length / np
  const positions = new Float64Array(3 * nv)
  for (let v = 0; v < nv; v++) {
    for (let k = 0; k < 3; k++) positions[3 * v + k] = m.vertProperties[np * v + k] * f.s + f.c[k]
  }
  return { positions, indices: new Uint32Array(m.triVerts) }
}

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
 * @throws GeometryError('NOT_MANIFOLD') if either mesh is not a closed manifold,
 *   ('BAD_INPUT') for a negative overlap depth.
 */
export async function overlapAndUnion(
  meshAContact: TriMesh,
  meshB: TriMesh,
  poseB: { quaternion: [number, number, number, number], translation: Vec3 },
  direction: Vec3,
  overlapDepth: number,
): Promise<OverlapResult> {
  if (!(overlapDepth >= 0) || !Number.isFinite(overlapDepth)) throw new GeometryError('BAD_INPUT', 'overlapAndUnion: overlapDepth must be ≥ 0', [{ path: 'overlapDepth', message: 'must be ≥ 0' }])
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
      if (st !== 'NoError') throw new GeometryError('BOOLEAN_FAILED', `overlapAndUnion: ${w} failed (manifold-3d status ${st})`)
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
 * @throws GeometryError('NOT_MANIFOLD'), ('EMPTY_PART') when the plane misses the body.
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
    if (pos.isEmpty() || neg.isEmpty()) throw new GeometryError('EMPTY_PART', 'splitMeshByPlane: the plane does not cut the body into two parts')
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
