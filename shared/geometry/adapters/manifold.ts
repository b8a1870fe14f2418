/**
 * Adapter to manifold-3d (WASM): the only file of the core that imports it. The module is loaded
 * once (`loadManifold()`); meshes go in and come out through `toManifold` / `fromManifold`.
 * Callers free every WASM object with `.delete()` in a `finally`.
 *
 * Precision: manifold-3d stores vertices as float32. Meshes are centred and scaled to unit size
 * before they go in and mapped back to float64 metres after, so the relative precision is ~1e-7 of
 * the configuration size whatever the absolute coordinates.
 */
import Module from 'manifold-3d'
import type { ManifoldToplevel, Manifold as ManifoldT } from 'manifold-3d'
import type { TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'

export type { ManifoldT }

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
export interface UnitFrame { c: Vec3, s: number }

export function unitFrameOf(meshes: TriMesh[]): UnitFrame {
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

export function toManifold(wasm: ManifoldToplevel, mesh: TriMesh, f: UnitFrame, what: string): ManifoldT {
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
    throw new GeometryError('not-manifold', `${what}: mesh is not a closed 2-manifold (manifold-3d status ${st})`)
  }
  return man
}

export function fromManifold(man: ManifoldT, f: UnitFrame): TriMesh {
  const m = man.getMesh()
  const np = m.numProp
  const nv = m.vertProperties.length / np
  const positions = new Float64Array(3 * nv)
  for (let v = 0; v < nv; v++) {
    for (let k = 0; k < 3; k++) positions[3 * v + k] = m.vertProperties[np * v + k] * f.s + f.c[k]
  }
  return { positions, indices: new Uint32Array(m.triVerts) }
}
