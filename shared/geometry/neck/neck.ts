/**
 * Plane sections of closed meshes and the neck of a two-lobe union.
 *
 * The NECK is the deepest interior minimum of the section area of the union between the two lobe
 * centroids, over the plane's position along the line of centres and its tilt from that line
 * (tilt ≤ 30°, `NECK_TILT_LIMIT_DEG`). Only the section component that contains the contact
 * point's projection (or, failing that, lies nearest to it) is kept, minus the holes inside it.
 * All coordinates in the contact frame (A's file axes, origin at A's centroid), m.
 */
import type { TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import type { Pose } from '../contact/first-contact'
import { add, anyPerpendicular, cross, dot, normalize, scale, sub } from '../math/linalg'
import { overlapAndUnion } from '../merge/booleans'
import type { SectionComponent } from './section'
import { NECK_TILT_LIMIT_DEG, sectionComponent } from './section'

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
    if (opts.signal?.aborted) throw new GeometryError('aborted', 'findNeck: cancelled')
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
  if (iMin < 0) throw new GeometryError('no-neck', 'findNeck: the section area has no interior minimum between the lobe centroids')
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
