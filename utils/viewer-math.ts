/**
 * Small pure helpers of the 3D views (no three.js, no Vue): the colour scale, scale-bar lengths,
 * contact-frame placement and field ranges. Frames: "scene frame" is what the viewer draws in —
 * the lobe's file axes with the origin at its centroid (lobe view), or the contact frame (lobe A's
 * file axes, origin at A's centroid) in the joined view. Lengths in metres.
 */

export type V3 = [number, number, number]
export type Q4 = [number, number, number, number]

/**
 * Viridis (Smith, van der Walt & Firing, 2015), sampled from the published 256-entry sRGB table in
 * BIDS/colormap `colormaps.py` (`_viridis_data`, CC0) at entries 0, 16, 32, …, 240 and 255.
 * Between knots the colour is interpolated linearly in sRGB (the table itself is smooth at this spacing).
 */
const VIRIDIS_KNOTS: readonly (readonly [number, number, number])[] = [
  [0.267004, 0.004874, 0.329415],
  [0.282327, 0.094955, 0.417331],
  [0.278826, 0.175490, 0.483397],
  [0.258965, 0.251537, 0.524736],
  [0.229739, 0.322361, 0.545706],
  [0.199430, 0.387607, 0.554642],
  [0.172719, 0.448791, 0.557885],
  [0.149039, 0.508051, 0.557250],
  [0.127568, 0.566949, 0.550556],
  [0.120638, 0.625828, 0.533488],
  [0.157851, 0.683765, 0.501686],
  [0.246070, 0.738910, 0.452024],
  [0.369214, 0.788888, 0.382914],
  [0.515992, 0.831158, 0.294279],
  [0.678489, 0.863742, 0.189503],
  [0.845561, 0.887322, 0.099702],
  [0.993248, 0.906157, 0.143936],
]
/** Table index (0–255) of each knot. */
const KNOT_INDEX = [0, 16, 32, 48, 64, 80, 96, 112, 128, 144, 160, 176, 192, 208, 224, 240, 255]

/** Viridis at t ∈ [0, 1] (clamped; NaN → 0) as sRGB components in [0, 1], written into `out`. */
export function viridis(t: number, out: V3 = [0, 0, 0]): V3 {
  const x = (Number.isFinite(t) ? Math.min(1, Math.max(0, t)) : 0) * 255
  let k = 0
  while (k < KNOT_INDEX.length - 2 && x > KNOT_INDEX[k + 1]) k++
  const f = (x - KNOT_INDEX[k]) / (KNOT_INDEX[k + 1] - KNOT_INDEX[k])
  const a = VIRIDIS_KNOTS[k]
  const b = VIRIDIS_KNOTS[k + 1]
  out[0] = a[0] + f * (b[0] - a[0])
  out[1] = a[1] + f * (b[1] - a[1])
  out[2] = a[2] + f * (b[2] - a[2])
  return out
}

/** CSS `linear-gradient` stops of viridis, left (low) to right (high), for the legend. */
export function viridisCssGradient(steps = 16): string {
  const stops: string[] = []
  const c: V3 = [0, 0, 0]
  for (let i = 0; i <= steps; i++) {
    viridis(i / steps, c)
    stops.push(`rgb(${Math.round(c[0] * 255)} ${Math.round(c[1] * 255)} ${Math.round(c[2] * 255)}) ${((100 * i) / steps).toFixed(1)}%`)
  }
  return `linear-gradient(to right, ${stops.join(', ')})`
}

/**
 * The largest "nice" length (1, 2 or 5 × 10ⁿ metres) not longer than `maxLength` (m); 0 for a
 * non-positive or non-finite input.
 */
export function niceLength(maxLength: number): number {
  if (!(maxLength > 0) || !Number.isFinite(maxLength)) return 0
  const p = 10 ** Math.floor(Math.log10(maxLength))
  for (const m of [5, 2, 1]) if (m * p <= maxLength * (1 + 1e-12)) return m * p
  return p
}

/** Range of a field ignoring non-finite values; a flat field gets a ±1 % (or ±1) span. */
export function fieldRange(values: ArrayLike<number>): { min: number, max: number } {
  let min = Infinity
  let max = -Infinity
  for (let i = 0; i < values.length; i++) {
    const v = values[i]
    if (!Number.isFinite(v)) continue
    if (v < min) min = v
    if (v > max) max = v
  }
  if (min === Infinity) return { min: 0, max: 1 }
  if (max - min <= Math.abs(max) * 1e-9) {
    const pad = Math.abs(max) * 0.01 || 1
    return { min: min - pad, max: max + pad }
  }
  return { min, max }
}

/** Rotates v by the unit quaternion q = [w, x, y, z] (active, Hamilton convention). */
export function rotateByQuat(q: Q4, v: V3): V3 {
  const [w, x, y, z] = q
  // t = 2 q_v × v; v' = v + w t + q_v × t
  const tx = 2 * (y * v[2] - z * v[1])
  const ty = 2 * (z * v[0] - x * v[2])
  const tz = 2 * (x * v[1] - y * v[0])
  return [
    v[0] + w * tx + (y * tz - z * ty),
    v[1] + w * ty + (z * tx - x * tz),
    v[2] + w * tz + (x * ty - y * tx),
  ]
}

/**
 * Scene-frame placement of a display mesh whose float32 positions are relative to `origin`
 * (metres, file frame), as an object position and quaternion:
 * - lobe A (or the lobe view): x = x_file − centroid → position = origin − centroid, no rotation;
 * - lobe B: x = R(q)·x_file + translation (+ extra offset) → position = R(q)·origin + translation.
 */
export function placeDisplayMesh(origin: V3, pose: { centroid: V3 } | { quaternion: Q4, translation: V3 }, extra: V3 = [0, 0, 0]): { position: V3, quaternion: Q4 } {
  if ('centroid' in pose) {
    return { position: [origin[0] - pose.centroid[0] + extra[0], origin[1] - pose.centroid[1] + extra[1], origin[2] - pose.centroid[2] + extra[2]], quaternion: [1, 0, 0, 0] }
  }
  const r = rotateByQuat(pose.quaternion, origin)
  return { position: [r[0] + pose.translation[0] + extra[0], r[1] + pose.translation[1] + extra[1], r[2] + pose.translation[2] + extra[2]], quaternion: pose.quaternion }
}

/** An "up" direction for a camera looking along `dir` (any unit vector not parallel to it). */
export function upFor(dir: V3): V3 {
  const ref: V3 = Math.abs(dir[2]) < 0.9 ? [0, 0, 1] : [0, 1, 0]
  // Remove the component along dir.
  const d = ref[0] * dir[0] + ref[1] * dir[1] + ref[2] * dir[2]
  const u: V3 = [ref[0] - d * dir[0], ref[1] - d * dir[1], ref[2] - d * dir[2]]
  const n = Math.hypot(u[0], u[1], u[2])
  return [u[0] / n, u[1] / n, u[2] / n]
}

/**
 * The part of a contact study (`GET /api/studies/:id`) the joined view reads. Every vector is in
 * the contact frame (lobe A's file axes, origin at A's centroid), metres.
 */
export interface ViewerStudy {
  id: number
  status: string
  lobeA: { id: number, name?: string }
  lobeB: { id: number, name?: string }
  input: { direction: V3, orbitNormal?: V3 | null, orientationB?: Q4, overlapDepth?: number }
  result?: {
    contact: { contact?: false, separation: number, point?: V3, normalA?: V3, poseB?: { quaternion: Q4, translation: V3 } }
    neck: { overlapDepth: number, outline: number[][] } | null
    merged: { centroid: V3, principalAxes: [V3, V3, V3] } | null
  } | null
}

/**
 * Lobe B's pose for drawing: the study's contact pose moved by the neck's overlap depth along the
 * line of centres (the configuration of the neck, union and merged body), or — when the lobes never
 * touch — B at its starting orientation with its centroid at `separation` along the direction.
 */
export function drawnPoseB(study: ViewerStudy, centroidB: V3, fallbackSeparation: number): { quaternion: Q4, translation: V3 } | null {
  const r = study.result
  if (!r) return null
  const d = study.input.direction
  const pose = r.contact.poseB
  if (pose) {
    const depth = r.neck?.overlapDepth ?? 0
    return { quaternion: pose.quaternion, translation: [pose.translation[0] - d[0] * depth, pose.translation[1] - d[1] * depth, pose.translation[2] - d[2] * depth] }
  }
  const q = study.input.orientationB ?? [1, 0, 0, 0]
  const c = rotateByQuat(q, centroidB)
  const s = Number.isFinite(r.contact.separation) && r.contact.separation > 0 ? r.contact.separation : fallbackSeparation
  return { quaternion: q, translation: [d[0] * s - c[0], d[1] * s - c[1], d[2] * s - c[2]] }
}
