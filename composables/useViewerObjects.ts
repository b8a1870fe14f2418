import {
  BufferAttribute, BufferGeometry, CatmullRomCurve3, Color, CylinderGeometry, Mesh, MeshBasicMaterial,
  MeshLambertMaterial, Quaternion, SRGBColorSpace, SphereGeometry, TubeGeometry, Vector3,
} from 'three'
import type { Material, Object3D, Texture } from 'three'
import type { DisplayMesh } from '#shared/utils/mesh-binary'
import { viridis, type V3 } from '~~/utils/viewer-math'

/**
 * Keeps every geometry, material and texture a view creates, and frees them all at once (on
 * unmount, or when a view swaps what it shows). The renderer itself is freed by TresCanvas.
 */
export function createDisposer() {
  const items = new Set<{ dispose: () => void }>()
  return {
    track<T extends BufferGeometry | Material | Texture>(item: T): T {
      items.add(item)
      return item
    },
    /** Frees one tracked item now. */
    release(item: { dispose: () => void } | null | undefined) {
      if (!item) return
      item.dispose()
      items.delete(item)
    },
    dispose() {
      for (const i of items) i.dispose()
      items.clear()
    },
    get size() { return items.size },
  }
}
export type Disposer = ReturnType<typeof createDisposer>

/** Frees a view's objects when the calling component unmounts. */
export function useDisposer(): Disposer {
  const d = createDisposer()
  onBeforeUnmount(() => d.dispose())
  return d
}

/**
 * Geometry of a display mesh, positions as sent (float32, relative to `mesh.origin`); the object
 * holding it is placed at origin − centroid (or the contact pose) so float32 keeps its precision.
 */
export function displayMeshGeometry(mesh: DisplayMesh): BufferGeometry {
  const g = new BufferGeometry()
  g.setAttribute('position', new BufferAttribute(mesh.positions, 3))
  g.setIndex(new BufferAttribute(mesh.indices, 1))
  g.computeVertexNormals()
  g.computeBoundingSphere()
  return g
}

/**
 * Flat per-face colouring of the evaluation surface from /fields: one colour per face from viridis
 * over [range.min, range.max]. Positions (m, file frame, float64) are shifted by −`shift` before
 * they become float32, so the mesh is drawn in the scene frame.
 */
export function fieldGeometry(positions: ArrayLike<number>, indices: ArrayLike<number>, values: ArrayLike<number>, range: { min: number, max: number }, shift: V3): BufferGeometry {
  const nf = indices.length / 3
  const pos = new Float32Array(nf * 9)
  const col = new Float32Array(nf * 9)
  const c = new Color()
  const rgb: V3 = [0, 0, 0]
  const span = range.max - range.min
  for (let f = 0; f < nf; f++) {
    viridis((values[f] - range.min) / span, rgb)
    c.setRGB(rgb[0], rgb[1], rgb[2], SRGBColorSpace)
    for (let k = 0; k < 3; k++) {
      const v = indices[3 * f + k]
      const o = 9 * f + 3 * k
      pos[o] = positions[3 * v] - shift[0]
      pos[o + 1] = positions[3 * v + 1] - shift[1]
      pos[o + 2] = positions[3 * v + 2] - shift[2]
      col[o] = c.r
      col[o + 1] = c.g
      col[o + 2] = c.b
    }
  }
  const g = new BufferGeometry()
  g.setAttribute('position', new BufferAttribute(pos, 3))
  g.setAttribute('color', new BufferAttribute(col, 3))
  g.computeVertexNormals()
  g.computeBoundingSphere()
  return g
}

/** A matte surface for a lobe (Lambert: no specular sheen, which dark regolith does not show). */
export function surfaceMaterial(d: Disposer, colour: string): MeshLambertMaterial {
  return d.track(new MeshLambertMaterial({ color: new Color(colour), flatShading: false }))
}

/** Unlit per-vertex colours, so the surface shows exactly the legend's colours. */
export function fieldMaterial(d: Disposer): MeshBasicMaterial {
  return d.track(new MeshBasicMaterial({ vertexColors: true }))
}

/** Marks a mesh as a body surface: the wireframe toggle applies to it, markers are left alone. */
export function asSurface<T extends Object3D>(o: T): T {
  o.userData.surface = true
  return o
}

/** A closed tube through the points (the neck outline drawn as a ring); null for < 3 points. */
export function ringMesh(d: Disposer, points: number[][], tubeRadius: number, colour: string): Mesh | null {
  if (points.length < 3) return null
  const curve = new CatmullRomCurve3(points.map(p => new Vector3(p[0], p[1], p[2])), true, 'centripetal')
  const geom = d.track(new TubeGeometry(curve, Math.min(512, Math.max(48, points.length * 2)), tubeRadius, 8, true))
  const m = new Mesh(geom, d.track(new MeshBasicMaterial({ color: new Color(colour) })))
  m.renderOrder = 2
  return m
}

/** A small unlit ball (markers: contact point, centroid). */
export function markerBall(d: Disposer, at: V3, radius: number, colour: string): Mesh {
  const m = new Mesh(d.track(new SphereGeometry(radius, 20, 14)), d.track(new MeshBasicMaterial({ color: new Color(colour) })))
  m.position.set(at[0], at[1], at[2])
  return m
}

/** A thin rod from `at − dir·half` to `at + dir·half` (principal axes). */
export function axisRod(d: Disposer, at: V3, dir: V3, half: number, radius: number, colour: string): Mesh {
  const m = new Mesh(d.track(new CylinderGeometry(radius, radius, 2 * half, 10, 1)), d.track(new MeshBasicMaterial({ color: new Color(colour) })))
  m.quaternion.copy(new Quaternion().setFromUnitVectors(new Vector3(0, 1, 0), new Vector3(dir[0], dir[1], dir[2]).normalize()))
  m.position.set(at[0], at[1], at[2])
  return m
}
