/**
 * Exact primitives of the contact search on float64 triangle arrays: point–triangle,
 * segment–segment and triangle–triangle distances, and translational times of impact (vertex–face
 * ray hits both ways, edge–edge 3×3 solve). Scratch arrays are module-level: no allocation per call.
 */
// ============================================================ exact triangle–triangle distance

/** Scratch results of the primitive distance helpers: closest points p (first), q (second). */
const _cp = new Float64Array(6)

/**
 * Squared distance from point p to triangle (a, b, c) — all given as offsets into flat arrays —
 * with the closest point written to out[o..o+2]. Ericson, Real-Time Collision Detection (2005),
 * §5.1.5 (Voronoi-region walk).
 */
export function pointTriangleDistSq(
  px: number, py: number, pz: number, T: Float64Array, t: number, out: Float64Array, o: number,
): number {
  const ax = T[t], ay = T[t + 1], az = T[t + 2]
  const abx = T[t + 3] - ax, aby = T[t + 4] - ay, abz = T[t + 5] - az
  const acx = T[t + 6] - ax, acy = T[t + 7] - ay, acz = T[t + 8] - az
  const apx = px - ax, apy = py - ay, apz = pz - az
  const d1 = abx * apx + aby * apy + abz * apz
  const d2 = acx * apx + acy * apy + acz * apz
  let qx: number, qy: number, qz: number
  if (d1 <= 0 && d2 <= 0) { qx = ax; qy = ay; qz = az }
  else {
    const bpx = px - T[t + 3], bpy = py - T[t + 4], bpz = pz - T[t + 5]
    const d3 = abx * bpx + aby * bpy + abz * bpz
    const d4 = acx * bpx + acy * bpy + acz * bpz
    if (d3 >= 0 && d4 <= d3) { qx = T[t + 3]; qy = T[t + 4]; qz = T[t + 5] }
    else {
      const vc = d1 * d4 - d3 * d2
      if (vc <= 0 && d1 >= 0 && d3 <= 0) {
        const v = d1 / (d1 - d3)
        qx = ax + v * abx; qy = ay + v * aby; qz = az + v * abz
      }
      else {
        const cpx = px - T[t + 6], cpy = py - T[t + 7], cpz = pz - T[t + 8]
        const d5 = abx * cpx + aby * cpy + abz * cpz
        const d6 = acx * cpx + acy * cpy + acz * cpz
        if (d6 >= 0 && d5 <= d6) { qx = T[t + 6]; qy = T[t + 7]; qz = T[t + 8] }
        else {
          const vb = d5 * d2 - d1 * d6
          if (vb <= 0 && d2 >= 0 && d6 <= 0) {
            const w = d2 / (d2 - d6)
            qx = ax + w * acx; qy = ay + w * acy; qz = az + w * acz
          }
          else {
            const va = d3 * d6 - d5 * d4
            if (va <= 0 && d4 - d3 >= 0 && d5 - d6 >= 0) {
              const w = (d4 - d3) / ((d4 - d3) + (d5 - d6))
              qx = T[t + 3] + w * (T[t + 6] - T[t + 3]); qy = T[t + 4] + w * (T[t + 7] - T[t + 4]); qz = T[t + 5] + w * (T[t + 8] - T[t + 5])
            }
            else {
              const den = 1 / (va + vb + vc)
              const v = vb * den, w = vc * den
              qx = ax + abx * v + acx * w; qy = ay + aby * v + acy * w; qz = az + abz * v + acz * w
            }
          }
        }
      }
    }
  }
  out[o] = qx; out[o + 1] = qy; out[o + 2] = qz
  return (px - qx) ** 2 + (py - qy) ** 2 + (pz - qz) ** 2
}

/**
 * Squared distance between segments P1Q1 and P2Q2 (offsets into flat arrays), closest points to
 * out[0..2] (first segment) and out[3..5]. Ericson (2005) §5.1.9, degenerate segments handled.
 */
export function segmentSegmentDistSq(S1: Float64Array, p1: number, q1: number, S2: Float64Array, p2: number, q2: number, out: Float64Array): number {
  const d1x = S1[q1] - S1[p1], d1y = S1[q1 + 1] - S1[p1 + 1], d1z = S1[q1 + 2] - S1[p1 + 2]
  const d2x = S2[q2] - S2[p2], d2y = S2[q2 + 1] - S2[p2 + 1], d2z = S2[q2 + 2] - S2[p2 + 2]
  const rx = S1[p1] - S2[p2], ry = S1[p1 + 1] - S2[p2 + 1], rz = S1[p1 + 2] - S2[p2 + 2]
  const a = d1x * d1x + d1y * d1y + d1z * d1z
  const e = d2x * d2x + d2y * d2y + d2z * d2z
  const f = d2x * rx + d2y * ry + d2z * rz
  const EPS = 1e-300
  let s: number, t: number
  if (a <= EPS && e <= EPS) { s = 0; t = 0 }
  else if (a <= EPS) { s = 0; t = Math.min(1, Math.max(0, f / e)) }
  else {
    const c = d1x * rx + d1y * ry + d1z * rz
    if (e <= EPS) { t = 0; s = Math.min(1, Math.max(0, -c / a)) }
    else {
      const b = d1x * d2x + d1y * d2y + d1z * d2z
      const denom = a * e - b * b
      s = denom > 1e-14 * a * e ? Math.min(1, Math.max(0, (b * f - c * e) / denom)) : 0
      t = (b * s + f) / e
      if (t < 0) { t = 0; s = Math.min(1, Math.max(0, -c / a)) }
      else if (t > 1) { t = 1; s = Math.min(1, Math.max(0, (b - c) / a)) }
    }
  }
  out[0] = S1[p1] + d1x * s; out[1] = S1[p1 + 1] + d1y * s; out[2] = S1[p1 + 2] + d1z * s
  out[3] = S2[p2] + d2x * t; out[4] = S2[p2 + 1] + d2y * t; out[5] = S2[p2 + 2] + d2z * t
  return (out[0] - out[3]) ** 2 + (out[1] - out[4]) ** 2 + (out[2] - out[5]) ** 2
}

/** Does segment PQ (offsets into S) cross triangle T (offset t)? Writes the crossing to out[0..2]. */
function segmentCrossesTriangle(S: Float64Array, p: number, q: number, T: Float64Array, t: number, out: Float64Array): boolean {
  const ax = T[t], ay = T[t + 1], az = T[t + 2]
  const e1x = T[t + 3] - ax, e1y = T[t + 4] - ay, e1z = T[t + 5] - az
  const e2x = T[t + 6] - ax, e2y = T[t + 7] - ay, e2z = T[t + 8] - az
  const nx = e1y * e2z - e1z * e2y, ny = e1z * e2x - e1x * e2z, nz = e1x * e2y - e1y * e2x
  const dp = (S[p] - ax) * nx + (S[p + 1] - ay) * ny + (S[p + 2] - az) * nz
  const dq = (S[q] - ax) * nx + (S[q + 1] - ay) * ny + (S[q + 2] - az) * nz
  if ((dp > 0 && dq > 0) || (dp < 0 && dq < 0) || dp === dq) return false
  const s = dp / (dp - dq)
  const x = S[p] + s * (S[q] - S[p]), y = S[p + 1] + s * (S[q + 1] - S[p + 1]), z = S[p + 2] + s * (S[q + 2] - S[p + 2])
  // Barycentric test of the crossing point.
  const wx = x - ax, wy = y - ay, wz = z - az
  const uu = e1x * e1x + e1y * e1y + e1z * e1z, vv = e2x * e2x + e2y * e2y + e2z * e2z, uv = e1x * e2x + e1y * e2y + e1z * e2z
  const wu = wx * e1x + wy * e1y + wz * e1z, wv = wx * e2x + wy * e2y + wz * e2z
  const den = uv * uv - uu * vv
  if (den === 0) return false
  const bu = (uv * wv - vv * wu) / den
  const bv = (uv * wu - uu * wv) / den
  if (bu < 0 || bv < 0 || bu + bv > 1) return false
  out[0] = x; out[1] = y; out[2] = z
  return true
}

const _sx = new Float64Array(3)
const _tmp6 = new Float64Array(6)

/**
 * Exact distance between triangles T1 (offset t1 in A) and T2 (offset t2 in B), 9 coordinates each.
 * Zero when they intersect (an edge of one crosses the other). Otherwise the minimum of the 6
 * vertex–triangle and 9 edge–edge distances, which is exact for disjoint triangles (Ericson 2005
 * §5.1.9 remark; common practice). Closest points to out[0..2] (on T1) and out[3..5] (on T2).
 */
export function triangleTriangleDistance(A: Float64Array, t1: number, B: Float64Array, t2: number, out: Float64Array): number {
  for (let e = 0; e < 3; e++) {
    const p = t1 + 3 * e, q = t1 + 3 * ((e + 1) % 3)
    if (segmentCrossesTriangle(A, p, q, B, t2, _sx)) { out[0] = out[3] = _sx[0]; out[1] = out[4] = _sx[1]; out[2] = out[5] = _sx[2]; return 0 }
    const p2 = t2 + 3 * e, q2 = t2 + 3 * ((e + 1) % 3)
    if (segmentCrossesTriangle(B, p2, q2, A, t1, _sx)) { out[0] = out[3] = _sx[0]; out[1] = out[4] = _sx[1]; out[2] = out[5] = _sx[2]; return 0 }
  }
  let best = Infinity
  for (let v = 0; v < 3; v++) {
    const o1 = t1 + 3 * v
    let d = pointTriangleDistSq(A[o1], A[o1 + 1], A[o1 + 2], B, t2, _tmp6, 3)
    if (d < best) { best = d; out[0] = A[o1]; out[1] = A[o1 + 1]; out[2] = A[o1 + 2]; out[3] = _tmp6[3]; out[4] = _tmp6[4]; out[5] = _tmp6[5] }
    const o2 = t2 + 3 * v
    d = pointTriangleDistSq(B[o2], B[o2 + 1], B[o2 + 2], A, t1, _tmp6, 0)
    if (d < best) { best = d; out[0] = _tmp6[0]; out[1] = _tmp6[1]; out[2] = _tmp6[2]; out[3] = B[o2]; out[4] = B[o2 + 1]; out[5] = B[o2 + 2] }
  }
  for (let i = 0; i < 3; i++) {
    for (let j = 0; j < 3; j++) {
      const d = segmentSegmentDistSq(A, t1 + 3 * i, t1 + 3 * ((i + 1) % 3), B, t2 + 3 * j, t2 + 3 * ((j + 1) % 3), _tmp6)
      if (d < best) { best = d; for (let k = 0; k < 6; k++) out[k] = _tmp6[k] }
    }
  }
  return Math.sqrt(best)
}

// ============================================================ exact translational time of impact

/**
 * Smallest t ∈ [0, tMax] at which ray o + t·w meets triangle T (offset t0), two-sided,
 * boundary included with a relative tolerance (Möller & Trumbore 1997). Infinity if none.
 */
function rayTriangle(ox: number, oy: number, oz: number, wx: number, wy: number, wz: number, T: Float64Array, t0: number, tMax: number): number {
  const ax = T[t0], ay = T[t0 + 1], az = T[t0 + 2]
  const e1x = T[t0 + 3] - ax, e1y = T[t0 + 4] - ay, e1z = T[t0 + 5] - az
  const e2x = T[t0 + 6] - ax, e2y = T[t0 + 7] - ay, e2z = T[t0 + 8] - az
  const px = wy * e2z - wz * e2y, py = wz * e2x - wx * e2z, pz = wx * e2y - wy * e2x
  const det = e1x * px + e1y * py + e1z * pz
  const scaleSq = (e1x * e1x + e1y * e1y + e1z * e1z) * (e2x * e2x + e2y * e2y + e2z * e2z)
  if (det * det <= 1e-24 * scaleSq) return Infinity
  const inv = 1 / det
  const sx = ox - ax, sy = oy - ay, sz = oz - az
  const u = (sx * px + sy * py + sz * pz) * inv
  const EPS = 1e-12
  if (u < -EPS || u > 1 + EPS) return Infinity
  const qx = sy * e1z - sz * e1y, qy = sz * e1x - sx * e1z, qz = sx * e1y - sy * e1x
  const v = (wx * qx + wy * qy + wz * qz) * inv
  if (v < -EPS || u + v > 1 + EPS) return Infinity
  const t = (e2x * qx + e2y * qy + e2z * qz) * inv
  return t >= 0 && t <= tMax ? t : Infinity
}

/** TOI of edge A: a + s·e1 against edge B: b + r·e2 moving by t·w; Infinity if none in [0, tMax]. */
function edgeEdgeTOI(A: Float64Array, pa: number, qa: number, B: Float64Array, pb: number, qb: number, wx: number, wy: number, wz: number, tMax: number, out: Float64Array): number {
  // Solve s·e1 − r·e2 − t·w = b − a.
  const e1x = A[qa] - A[pa], e1y = A[qa + 1] - A[pa + 1], e1z = A[qa + 2] - A[pa + 2]
  const e2x = B[pb] - B[qb], e2y = B[pb + 1] - B[qb + 1], e2z = B[pb + 2] - B[qb + 2] // −e2
  const mx = -wx, my = -wy, mz = -wz
  const rx = B[pb] - A[pa], ry = B[pb + 1] - A[pa + 1], rz = B[pb + 2] - A[pa + 2]
  const c1x = e2y * mz - e2z * my, c1y = e2z * mx - e2x * mz, c1z = e2x * my - e2y * mx
  const det = e1x * c1x + e1y * c1y + e1z * c1z
  const l1 = e1x * e1x + e1y * e1y + e1z * e1z, l2 = e2x * e2x + e2y * e2y + e2z * e2z
  if (det * det <= 1e-20 * l1 * l2) return Infinity
  const inv = 1 / det
  const s = (rx * c1x + ry * c1y + rz * c1z) * inv
  if (s < -1e-12 || s > 1 + 1e-12) return Infinity
  const c2x = ry * mz - rz * my, c2y = rz * mx - rx * mz, c2z = rx * my - ry * mx
  const r = (e1x * c2x + e1y * c2y + e1z * c2z) * inv
  if (r < -1e-12 || r > 1 + 1e-12) return Infinity
  const c3x = e2y * rz - e2z * ry, c3y = e2z * rx - e2x * rz, c3z = e2x * ry - e2y * rx
  const t = (e1x * c3x + e1y * c3y + e1z * c3z) * inv
  if (!(t >= 0 && t <= tMax)) return Infinity
  out[0] = A[pa] + s * e1x; out[1] = A[pa + 1] + s * e1y; out[2] = A[pa + 2] + s * e1z
  return t
}

const _pt = new Float64Array(3)

/**
 * Time of impact of triangle T2 (moving by t·w) against static T1, t ∈ [0, tMax]; contact point
 * (at the impact, A's frame) to out[0..2]. Infinity if they do not meet.
 */
export function triangleTriangleTOI(A: Float64Array, t1: number, B: Float64Array, t2: number, wx: number, wy: number, wz: number, tMax: number, out: Float64Array): number {
  let best = Infinity
  for (let v = 0; v < 3; v++) {
    const ob = t2 + 3 * v
    let t = rayTriangle(B[ob], B[ob + 1], B[ob + 2], wx, wy, wz, A, t1, Math.min(tMax, best))
    if (t < best) { best = t; out[0] = B[ob] + t * wx; out[1] = B[ob + 1] + t * wy; out[2] = B[ob + 2] + t * wz }
    const oa = t1 + 3 * v
    t = rayTriangle(A[oa], A[oa + 1], A[oa + 2], -wx, -wy, -wz, B, t2, Math.min(tMax, best))
    if (t < best) { best = t; out[0] = A[oa]; out[1] = A[oa + 1]; out[2] = A[oa + 2] }
  }
  for (let i = 0; i < 3; i++) {
    for (let j = 0; j < 3; j++) {
      const t = edgeEdgeTOI(A, t1 + 3 * i, t1 + 3 * ((i + 1) % 3), B, t2 + 3 * j, t2 + 3 * ((j + 1) % 3), wx, wy, wz, Math.min(tMax, best), _pt)
      if (t < best) { best = t; out[0] = _pt[0]; out[1] = _pt[1]; out[2] = _pt[2] }
    }
  }
  return best
}
