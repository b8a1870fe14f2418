/**
 * Plane sections of closed meshes: loops chained through shared edges, and the section component
 * around a target point. Coordinates in the mesh's frame, m.
 */
import type { TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import { add, anyPerpendicular, cross, dot, normalize, scale } from '../math/linalg'

export const NECK_TILT_LIMIT_DEG = 30

/** One closed section loop: points (plane-projected 3D, m), signed area (CCW seen from +normal positive). */
export interface SectionLoop { points: Vec3[], signedArea: number, perimeter: number }

/**
 * Section of a closed, consistently oriented, welded mesh by the plane through `point` with unit
 * `normal`: closed polylines chained through shared edges. Vertices exactly on the plane are
 * counted on the + side (simulation of simplicity), so every crossing lies strictly inside an edge.
 * Loops are oriented counter-clockwise seen from +normal around material (holes clockwise).
 * @throws GeometryError('open-section') if the chaining finds an open chain (mesh not closed/welded).
 */
export function sectionByPlane(mesh: TriMesh, point: Vec3, normal: Vec3, faceSubset?: Uint32Array): SectionLoop[] {
  const n = normalize(normal, 'sectionByPlane: normal')
  const P = mesh.positions, I = mesh.indices
  const nv = P.length / 3
  const sd = new Float64Array(nv)
  const off = dot(point, n)
  for (let v = 0; v < nv; v++) sd[v] = P[3 * v] * n[0] + P[3 * v + 1] * n[1] + P[3 * v + 2] * n[2] - off
  const e1 = anyPerpendicular(n), e2 = cross(n, e1)
  // Segments: from crossing on edge keyStart to crossing on edge keyEnd.
  const next = new Map<number, number>()
  const pts = new Map<number, Vec3>()
  const crossing = (a: number, b: number): number => {
    const lo = a < b ? a : b, hi = a < b ? b : a
    const key = lo * nv + hi
    if (!pts.has(key)) {
      const t = sd[lo] / (sd[lo] - sd[hi])
      pts.set(key, [P[3 * lo] + t * (P[3 * hi] - P[3 * lo]), P[3 * lo + 1] + t * (P[3 * hi + 1] - P[3 * lo + 1]), P[3 * lo + 2] + t * (P[3 * hi + 2] - P[3 * lo + 2])])
    }
    return key
  }
  const nf = faceSubset ? faceSubset.length : I.length / 3
  for (let j = 0; j < nf; j++) {
    const f = faceSubset ? faceSubset[j] : j
    const a = I[3 * f], b = I[3 * f + 1], c = I[3 * f + 2]
    const pa = sd[a] >= 0, pb = sd[b] >= 0, pc = sd[c] >= 0
    if (pa === pb && pb === pc) continue
    // Rotate so that the lone vertex is first: lone = the vertex whose side differs.
    let v0: number, v1: number, v2: number
    if (pa !== pb && pa !== pc) { v0 = a; v1 = b; v2 = c }
    else if (pb !== pa && pb !== pc) { v0 = b; v1 = c; v2 = a }
    else { v0 = c; v1 = a; v2 = b }
    // Crossings on edges (v0,v1) and (v2,v0) of the CCW triangle. With the outline CCW seen from
    // +n, the in-plane outward direction t × n must follow the face's outward normal: the segment
    // runs from edge (v0,v1) to edge (v2,v0) when the lone vertex is on the + side, else reversed.
    const k01 = crossing(v0, v1), k20 = crossing(v2, v0)
    if (sd[v0] >= 0) next.set(k01, k20)
    else next.set(k20, k01)
  }
  const loops: SectionLoop[] = []
  const seen = new Set<number>()
  for (const startKey of next.keys()) {
    if (seen.has(startKey)) continue
    const loop: Vec3[] = []
    let k = startKey
    for (;;) {
      seen.add(k)
      loop.push(pts.get(k)!)
      const nk = next.get(k)
      if (nk === undefined) throw new GeometryError('open-section', 'sectionByPlane: a section chain does not close (mesh not closed or not welded)')
      k = nk
      if (k === startKey) break
      if (seen.has(k)) throw new GeometryError('open-section', 'sectionByPlane: section chains cross (mesh not 2-manifold)')
    }
    let area = 0, per = 0
    for (let i = 0; i < loop.length; i++) {
      const p = loop[i], q = loop[(i + 1) % loop.length]
      const px = dot(p, e1), py = dot(p, e2), qx = dot(q, e1), qy = dot(q, e2)
      area += px * qy - qx * py
      per += Math.hypot(q[0] - p[0], q[1] - p[1], q[2] - p[2])
    }
    loops.push({ points: loop, signedArea: area / 2, perimeter: per })
  }
  return loops
}

function inPolygon2(x: number, y: number, poly: Float64Array): boolean {
  let inside = false
  const m = poly.length / 2
  for (let i = 0, j = m - 1; i < m; j = i++) {
    const xi = poly[2 * i], yi = poly[2 * i + 1], xj = poly[2 * j], yj = poly[2 * j + 1]
    if ((yi > y) !== (yj > y) && x < (xj - xi) * (y - yi) / (yj - yi) + xi) inside = !inside
  }
  return inside
}

export interface SectionComponent {
  /** Area of the kept component minus its holes, m². */
  area: number
  /** Outer perimeter, m. */
  perimeter: number
  /** Extents along the component's principal in-plane directions, m (larger first). */
  widths: [number, number]
  /** Principal in-plane directions (unit, contact frame), matching `widths`. */
  widthDirections: [Vec3, Vec3]
  /** Outer outline, m, contact frame. */
  outline: Vec3[]
  /** Centroid of the component, m. */
  centroid: Vec3
}

/**
 * The section component containing (else nearest to) `target` projected onto the plane, with the
 * holes inside it removed. Returns null when the plane misses the mesh.
 */
export function sectionComponent(mesh: TriMesh, point: Vec3, normal: Vec3, target: Vec3, faceSubset?: Uint32Array): SectionComponent | null {
  const n = normalize(normal)
  const loops = sectionByPlane(mesh, point, n, faceSubset)
  if (loops.length === 0) return null
  const e1 = anyPerpendicular(n), e2 = cross(n, e1)
  const flat = loops.map((l) => {
    const f = new Float64Array(2 * l.points.length)
    l.points.forEach((p, i) => { f[2 * i] = dot(p, e1); f[2 * i + 1] = dot(p, e2) })
    return f
  })
  const tx = dot(target, e1), ty = dot(target, e2)
  let best = -1, bestDist = Infinity
  loops.forEach((l, i) => {
    if (l.signedArea <= 0) return
    if (inPolygon2(tx, ty, flat[i])) { if (bestDist > -1) { best = i; bestDist = -1 } return }
    if (bestDist < 0) return
    const f = flat[i]
    for (let k = 0; k < f.length; k += 2) {
      const dd = (f[k] - tx) ** 2 + (f[k + 1] - ty) ** 2
      if (dd < bestDist) { bestDist = dd; best = i }
    }
  })
  if (best < 0) return null
  const outer = loops[best]
  const of = flat[best]
  let area = outer.signedArea
  const holes: number[] = []
  loops.forEach((l, i) => {
    if (l.signedArea < 0 && inPolygon2(flat[i][0], flat[i][1], of)) { area += l.signedArea; holes.push(i) }
  })
  // In-plane area moments (outer + holes) for the principal directions.
  let A = 0, Sx = 0, Sy = 0, Ixx = 0, Iyy = 0, Ixy = 0
  for (const i of [best, ...holes]) {
    const f = flat[i], m = f.length / 2
    for (let k = 0; k < m; k++) {
      const x0 = f[2 * k], y0 = f[2 * k + 1], x1 = f[2 * ((k + 1) % m)], y1 = f[2 * ((k + 1) % m) + 1]
      const c = x0 * y1 - x1 * y0
      A += c / 2
      Sx += (x0 + x1) * c / 6; Sy += (y0 + y1) * c / 6
      Ixx += (x0 * x0 + x0 * x1 + x1 * x1) * c / 12
      Iyy += (y0 * y0 + y0 * y1 + y1 * y1) * c / 12
      Ixy += (x0 * y1 + 2 * x0 * y0 + 2 * x1 * y1 + x1 * y0) * c / 24
    }
  }
  const cx = Sx / A, cy = Sy / A
  const cxx = Ixx / A - cx * cx, cyy = Iyy / A - cy * cy, cxy = Ixy / A - cx * cy
  const ang = 0.5 * Math.atan2(2 * cxy, cxx - cyy)
  const d1: Vec3 = add(scale(e1, Math.cos(ang)), scale(e2, Math.sin(ang)))
  const d2: Vec3 = cross(n, d1)
  const ext = (d: Vec3) => {
    let lo = Infinity, hi = -Infinity
    for (const p of outer.points) { const s = dot(p, d); if (s < lo) lo = s; if (s > hi) hi = s }
    return hi - lo
  }
  let w1 = ext(d1), w2 = ext(d2)
  let dir1 = d1, dir2 = d2
  if (w2 > w1) { [w1, w2] = [w2, w1]; [dir1, dir2] = [dir2, dir1] }
  const off = dot(point, n)
  const centroid: Vec3 = add(add(scale(e1, cx), scale(e2, cy)), scale(n, off))
  return { area, perimeter: outer.perimeter, widths: [w1, w2], widthDirections: [dir1, dir2], outline: outer.points, centroid }
}
