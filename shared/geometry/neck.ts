/**
 * Plane sections of closed meshes and the neck of a two-lobe union.
 *
 * The NECK is the deepest interior minimum of the section area of the union between the two lobe
 * centroids, over the plane's position along the line of centres and its tilt from that line
 * (tilt ≤ 30°, `NECK_TILT_LIMIT_DEG`). Only the section component that contains the contact
 * point's projection (or, failing that, lies nearest to it) is kept, minus the holes inside it.
 * All coordinates in the contact frame (A's file axes, origin at A's centroid), m.
 */
import type { TriMesh, Vec3 } from './types'
import { GeometryError } from './types'
import { add, anyPerpendicular, cross, dot, normalize, scale, sub } from './quat'
import { overlapAndUnion } from './booleans'
import type { Pose } from './contact'

export const NECK_TILT_LIMIT_DEG = 30

/** One closed section loop: points (plane-projected 3D, m), signed area (CCW seen from +normal positive). */
export interface SectionLoop { points: Vec3[], signedArea: number, perimeter: number }

/**
 * Section of a closed, consistently oriented, welded mesh by the plane through `point` with unit
 * `normal`: closed polylines chained through shared edges. Vertices exactly on the plane are
 * counted on the + side (simulation of simplicity), so every crossing lies strictly inside an edge.
 * Loops are oriented counter-clockwise seen from +normal around material (holes clockwise).
 * @throws GeometryError('OPEN_SECTION') if the chaining finds an open chain (mesh not closed/welded).
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
      if (nk === undefined) throw new GeometryError('OPEN_SECTION', 'sectionByPlane: a section chain does not close (mesh not closed or not welded)')
      k = nk
      if (k === startKey) break
      if (seen.has(k)) throw new GeometryError('OPEN_SECTION', 'sectionByPlane: section chains cross (mesh not 2-manifold)')
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

export interface Neck {
  /** Extra approach beyond first contact, m. */
  overlapDepth: number
  /** Volume of the overlap lens, m³. */
  overlapVolume: number
  /** Neck section area, m² (0 at overlapDepth 0). */
  area: number
  /** √(area/π), m. */
  equivalentRadius: number
  perimeter: number
  /** Extents along the section's principal directions, m (larger first). */
  widths: [number, number]
  /** Neck plane, contact frame. */
  plane: { point: Vec3, normal: Vec3 }
  /** Outer outline of the neck section, m, contact frame (one [x,y,z] per vertex). */
  outline: number[][]
  tiltLimitDeg: number
  /** Ratios to the smaller lobe's volume-equivalent radius (r_eq/R_small, area/(πR_small²)). */
  ratios: { equivalentRadiusToSmallerLobe: number, areaToSmallerLobeDisc: number, widthsToSmallerLobeDiameter: [number, number] }
  /** Tilt of the plane from the line of centres, deg, and section evaluations used. */
  tiltDeg: number
  evaluations: number
}

export interface NeckSearchOptions {
  /** Search tilts (≤ 30°) as well as positions (default true). */
  tilt?: boolean
  /** Positions in the first scan along the line (default 41). */
  scanSteps?: number
  /** Maximum section evaluations in the tilt refinement (default 80). */
  maxRefineEvaluations?: number
  signal?: AbortSignal
}

/**
 * Neck of a union mesh between centroids `cA` and `cB` (contact frame): scan of tilt-0 planes along
 * the line, deepest interior local minimum, golden-section refinement of the position, then a
 * Nelder–Mead refinement of (position, tilt) with the tilt held ≤ 30°.
 */
export function findNeck(
  union: TriMesh, cA: Vec3, cB: Vec3, contactPoint: Vec3, smallerLobeRadius: number, opts: NeckSearchOptions = {},
): Omit<Neck, 'overlapDepth' | 'overlapVolume'> {
  const L = sub(cB, cA)
  const len = Math.hypot(...L)
  const u = normalize(L, 'findNeck: centroid separation')
  const e1 = anyPerpendicular(u), e2 = cross(u, e1)
  const maxTilt = Math.tan(NECK_TILT_LIMIT_DEG * Math.PI / 180)
  // Faces that a plane of tilt ≤ 30° through the inner 98% of the segment can reach: bounded by
  // the union's radius about the line; use all faces (the section is O(F) and cheap), but cache
  // per-vertex projections through the plane evaluation.
  let evals = 0
  const planeOf = (s: number, tx: number, ty: number) => {
    let t2 = Math.hypot(tx, ty)
    if (t2 > maxTilt) { tx *= maxTilt / t2; ty *= maxTilt / t2; t2 = maxTilt }
    const normal = normalize(add(u, add(scale(e1, tx), scale(e2, ty))))
    return { point: add(cA, scale(u, s)), normal }
  }
  const areaAt = (s: number, tx: number, ty: number): { a: number, c: SectionComponent | null } => {
    if (opts.signal?.aborted) throw new GeometryError('ABORTED', 'findNeck: cancelled')
    evals++
    const pl = planeOf(s, tx, ty)
    const c = sectionComponent(union, pl.point, pl.normal, contactPoint)
    return { a: c ? c.area : Infinity, c }
  }
  const N = opts.scanSteps ?? 41
  const sLo = 0.02 * len, sHi = 0.98 * len
  const ss: number[] = [], as: number[] = []
  for (let i = 0; i < N; i++) {
    const s = sLo + (sHi - sLo) * i / (N - 1)
    ss.push(s); as.push(areaAt(s, 0, 0).a)
  }
  // Deepest interior local minimum (not at the scan ends).
  let iMin = -1
  for (let i = 1; i < N - 1; i++) {
    if (as[i] <= as[i - 1] && as[i] <= as[i + 1] && (iMin < 0 || as[i] < as[iMin])) iMin = i
  }
  if (iMin < 0) throw new GeometryError('NO_NECK', 'findNeck: the section area has no interior minimum between the lobe centroids')
  // Golden-section on [s_{i-1}, s_{i+1}].
  let a = ss[iMin - 1], b = ss[iMin + 1]
  const gr = (Math.sqrt(5) - 1) / 2
  let x1 = b - gr * (b - a), x2 = a + gr * (b - a)
  let f1 = areaAt(x1, 0, 0).a, f2 = areaAt(x2, 0, 0).a
  for (let it = 0; it < 18; it++) {
    if (f1 < f2) { b = x2; x2 = x1; f2 = f1; x1 = b - gr * (b - a); f1 = areaAt(x1, 0, 0).a }
    else { a = x1; x1 = x2; f1 = f2; x2 = a + gr * (b - a); f2 = areaAt(x2, 0, 0).a }
  }
  let best = { s: (a + b) / 2, tx: 0, ty: 0 }
  let bestA = areaAt(best.s, 0, 0).a
  if (opts.tilt ?? true) {
    // Nelder–Mead on (s/len, tx, ty), tilt clamped in planeOf.
    const f = (x: number[]) => {
      const s = x[0] * len
      if (s <= sLo || s >= sHi) return Infinity
      return areaAt(s, x[1], x[2]).a
    }
    const h = (b - a) / len + 0.02
    let simplex = [[best.s / len, 0, 0], [best.s / len + h, 0, 0], [best.s / len, 0.15, 0], [best.s / len, 0, 0.15]]
    let vals = simplex.map(f)
    const maxEval = opts.maxRefineEvaluations ?? 80
    const start = evals
    while (evals - start < maxEval) {
      const idx = [0, 1, 2, 3].sort((i, j) => vals[i] - vals[j])
      simplex = idx.map(i => simplex[i]); vals = idx.map(i => vals[i])
      if (Math.abs(vals[3] - vals[0]) <= 1e-6 * Math.abs(vals[0]) + 1e-300) break
      const cen = [0, 1, 2].map(k => (simplex[0][k] + simplex[1][k] + simplex[2][k]) / 3)
      const refl = cen.map((c, k) => c + (c - simplex[3][k]))
      const fr = f(refl)
      if (fr < vals[0]) {
        const exp = cen.map((c, k) => c + 2 * (c - simplex[3][k]))
        const fe = f(exp)
        if (fe < fr) { simplex[3] = exp; vals[3] = fe }
        else { simplex[3] = refl; vals[3] = fr }
      }
      else if (fr < vals[2]) { simplex[3] = refl; vals[3] = fr }
      else {
        const con = cen.map((c, k) => c + 0.5 * (simplex[3][k] - c))
        const fc = f(con)
        if (fc < vals[3]) { simplex[3] = con; vals[3] = fc }
        else {
          for (let i = 1; i < 4; i++) { simplex[i] = simplex[i].map((v, k) => simplex[0][k] + 0.5 * (v - simplex[0][k])); vals[i] = f(simplex[i]) }
        }
      }
    }
    const i0 = vals.indexOf(Math.min(...vals))
    if (vals[i0] < bestA) { best = { s: simplex[i0][0] * len, tx: simplex[i0][1], ty: simplex[i0][2] }; bestA = vals[i0] }
  }
  const pl = planeOf(best.s, best.tx, best.ty)
  const comp = areaAt(best.s, best.tx, best.ty).c!
  const req = Math.sqrt(comp.area / Math.PI)
  return {
    area: comp.area,
    equivalentRadius: req,
    perimeter: comp.perimeter,
    widths: comp.widths,
    plane: { point: comp.centroid, normal: pl.normal },
    outline: comp.outline.map(p => [p[0], p[1], p[2]]),
    tiltLimitDeg: NECK_TILT_LIMIT_DEG,
    ratios: {
      equivalentRadiusToSmallerLobe: req / smallerLobeRadius,
      areaToSmallerLobeDisc: comp.area / (Math.PI * smallerLobeRadius ** 2),
      widthsToSmallerLobeDiameter: [comp.widths[0] / (2 * smallerLobeRadius), comp.widths[1] / (2 * smallerLobeRadius)],
    },
    tiltDeg: Math.acos(Math.min(1, dot(pl.normal, u))) * 180 / Math.PI,
    evaluations: evals,
  }
}

/** The point-like neck at overlapDepth 0. */
export function pointNeck(contactPoint: Vec3, contactNormal: Vec3): Neck {
  return {
    overlapDepth: 0,
    overlapVolume: 0,
    area: 0,
    equivalentRadius: 0,
    perimeter: 0,
    widths: [0, 0],
    plane: { point: contactPoint, normal: normalize(contactNormal) },
    outline: [[...contactPoint]],
    tiltLimitDeg: NECK_TILT_LIMIT_DEG,
    ratios: { equivalentRadiusToSmallerLobe: 0, areaToSmallerLobeDisc: 0, widthsToSmallerLobeDiameter: [0, 0] },
    tiltDeg: 0,
    evaluations: 0,
  }
}

export interface NeckInput {
  /** A in the contact frame (A's file mesh minus its centroid). */
  meshAContact: TriMesh
  meshB: TriMesh
  /** B's pose at first contact, the line of centres, first-contact separation and point. */
  poseB: Pose
  direction: Vec3
  separation: number
  contactPoint: Vec3
  contactNormal: Vec3
  /** Smaller lobe's volume-equivalent radius, m. */
  smallerLobeRadius: number
}

/**
 * Neck (and union) after moving B a further `overlapDepth` along the line. At depth 0 the neck is
 * the contact point (area 0) and `union` is null (the lobes only touch).
 */
export async function neckAtDepth(input: NeckInput, overlapDepth: number, opts: NeckSearchOptions = {}): Promise<{ neck: Neck, union: TriMesh | null, unionVolume: number | null, intersection: TriMesh | null }> {
  if (overlapDepth === 0) return { neck: pointNeck(input.contactPoint, input.contactNormal), union: null, unionVolume: null, intersection: null }
  const ov = await overlapAndUnion(input.meshAContact, input.meshB, input.poseB, input.direction, overlapDepth)
  const u = normalize(input.direction)
  const cB = scale(u, input.separation - overlapDepth)
  // The contact point moves with the overlap: use the middle of the overlap along the line.
  const target = sub(input.contactPoint, scale(u, overlapDepth / 2))
  const n = findNeck(ov.union, [0, 0, 0], cB, target, input.smallerLobeRadius, opts)
  return { neck: { overlapDepth, overlapVolume: ov.overlapVolume, ...n }, union: ov.union, unionVolume: ov.unionVolume, intersection: ov.intersection }
}

/** Neck equivalent radius vs overlap depth, depths 0 … maxDepth (default R_small/4) in `steps` intervals. */
export async function neckSweep(input: NeckInput, steps = 6, maxDepth = input.smallerLobeRadius / 4, opts: NeckSearchOptions = {}): Promise<{ overlapDepth: number, equivalentRadius: number, area: number, overlapVolume: number }[]> {
  const out: { overlapDepth: number, equivalentRadius: number, area: number, overlapVolume: number }[] = []
  for (let i = 0; i <= steps; i++) {
    const depth = maxDepth * i / steps
    const { neck } = await neckAtDepth(input, depth, opts)
    out.push({ overlapDepth: depth, equivalentRadius: neck.equivalentRadius, area: neck.area, overlapVolume: neck.overlapVolume })
  }
  return out
}
