/**
 * Dual BVH traversals of the contact search: B rotated into A's axes once per query, exact
 * mesh–mesh distance (branch and bound) and the exact translational sweep (best-first over node
 * pairs by swept-box entry time).
 */
import type { Mat3, Vec3 } from '../types'
import type { ContactBvh } from './bvh'
import { triangleTriangleDistance, triangleTriangleTOI } from './primitives'

// ============================================================ rigid placement of B

/**
 * B rotated into A's axes once per query: triangle coordinates R·x and node boxes refitted tightly
 * around the rotated triangles (same tree topology). Placing B then only adds a translation t:
 * x_A = R x_B + t.
 */
interface RotatedB { bvh: ContactBvh, tri: Float64Array, box: Float64Array }

export function rotateB(bvh: ContactBvh, R: Mat3): RotatedB {
  const T = bvh.tri
  const tri = new Float64Array(T.length)
  const [r0, r1, r2] = R
  for (let i = 0; i < T.length; i += 3) {
    const x = T[i], y = T[i + 1], z = T[i + 2]
    tri[i] = r0[0] * x + r0[1] * y + r0[2] * z
    tri[i + 1] = r1[0] * x + r1[1] * y + r1[2] * z
    tri[i + 2] = r2[0] * x + r2[1] * y + r2[2] * z
  }
  const n = bvh.left.length
  const box = new Float64Array(6 * n)
  const L = bvh.left, Rr = bvh.right, S = bvh.start, C = bvh.count
  for (let k = n - 1; k >= 0; k--) {
    const b = 6 * k
    let x0 = Infinity, y0 = Infinity, z0 = Infinity, x1 = -Infinity, y1 = -Infinity, z1 = -Infinity
    if (L[k] === -1) {
      for (let i = 9 * S[k]; i < 9 * (S[k] + C[k]); i += 3) {
        const x = tri[i], y = tri[i + 1], z = tri[i + 2]
        if (x < x0) x0 = x; if (x > x1) x1 = x
        if (y < y0) y0 = y; if (y > y1) y1 = y
        if (z < z0) z0 = z; if (z > z1) z1 = z
      }
    }
    else {
      for (const c of [6 * L[k], 6 * Rr[k]]) {
        if (box[c] < x0) x0 = box[c]; if (box[c + 1] < y0) y0 = box[c + 1]; if (box[c + 2] < z0) z0 = box[c + 2]
        if (box[c + 3] > x1) x1 = box[c + 3]; if (box[c + 4] > y1) y1 = box[c + 4]; if (box[c + 5] > z1) z1 = box[c + 5]
      }
    }
    box[b] = x0; box[b + 1] = y0; box[b + 2] = z0; box[b + 3] = x1; box[b + 4] = y1; box[b + 5] = z1
  }
  return { bvh, tri, box }
}

/** Box of rotated B node n translated by t, into out[0..5]. */
function placedBox(rb: RotatedB, n: number, t: Float64Array, out: Float64Array): void {
  const b = rb.box, o = 6 * n
  out[0] = b[o] + t[0]; out[1] = b[o + 1] + t[1]; out[2] = b[o + 2] + t[2]
  out[3] = b[o + 3] + t[0]; out[4] = b[o + 4] + t[1]; out[5] = b[o + 5] + t[2]
}

/** Rotated B triangles [k0, k0+n) translated by t, into `out`. */
function placeTriangles(rb: RotatedB, k0: number, n: number, t: Float64Array, out: Float64Array): void {
  const T = rb.tri
  for (let v = 0; v < 3 * n; v++) {
    const s = 9 * k0 + 3 * v
    out[3 * v] = T[s] + t[0]
    out[3 * v + 1] = T[s + 1] + t[1]
    out[3 * v + 2] = T[s + 2] + t[2]
  }
}

function boxDistance(a: Float64Array, oa: number, b: Float64Array, ob: number): number {
  let s = 0
  for (let i = 0; i < 3; i++) {
    const g = Math.max(b[ob + i] - a[oa + 3 + i], a[oa + i] - b[ob + 3 + i], 0)
    s += g * g
  }
  return Math.sqrt(s)
}

/** Grow-on-demand stack/heap storage. */
class PairStack {
  a = new Int32Array(1024)
  b = new Int32Array(1024)
  key = new Float64Array(1024)
  n = 0
  push(x: number, y: number, k: number): void {
    if (this.n === this.a.length) {
      const grow = <T extends Int32Array | Float64Array>(arr: T): T => { const g = new (arr.constructor as any)(arr.length * 2); g.set(arr); return g }
      this.a = grow(this.a); this.b = grow(this.b); this.key = grow(this.key)
    }
    this.a[this.n] = x; this.b[this.n] = y; this.key[this.n] = k; this.n++
  }
}

/** Binary min-heap of node pairs keyed by a float. */
class PairHeap extends PairStack {
  pushHeap(x: number, y: number, k: number): void {
    this.push(x, y, k)
    let i = this.n - 1
    const { a, b, key } = this
    while (i > 0) {
      const p = (i - 1) >> 1
      if (key[p] <= key[i]) break
      const ta = a[p]; a[p] = a[i]; a[i] = ta
      const tb = b[p]; b[p] = b[i]; b[i] = tb
      const tk = key[p]; key[p] = key[i]; key[i] = tk
      i = p
    }
  }

  /** Pops the minimum into `popped` = [a, b] and returns its key. */
  pop(popped: Int32Array): number {
    const { a, b, key } = this
    const k0 = key[0]
    popped[0] = a[0]; popped[1] = b[0]
    this.n--
    if (this.n > 0) {
      a[0] = a[this.n]; b[0] = b[this.n]; key[0] = key[this.n]
      let i = 0
      for (;;) {
        const l = 2 * i + 1, r = l + 1
        let m = i
        if (l < this.n && key[l] < key[m]) m = l
        if (r < this.n && key[r] < key[m]) m = r
        if (m === i) break
        const ta = a[m]; a[m] = a[i]; a[i] = ta
        const tb = b[m]; b[m] = b[i]; b[i] = tb
        const tk = key[m]; key[m] = key[i]; key[i] = tk
        i = m
      }
    }
    return k0
  }
}

function nodeSize(bvh: ContactBvh, n: number): number {
  const b = bvh.box, o = 6 * n
  return (b[o + 3] - b[o]) + (b[o + 4] - b[o + 1]) + (b[o + 5] - b[o + 2])
}

// ============================================================ exact mesh–mesh distance

export interface MeshDistanceResult {
  /** Smallest triangle–triangle distance found, m (exact minimum when `lowerBound === distance`). */
  distance: number
  /** Certified lower bound of the surface distance, m (equals `distance` unless the pair budget ran out). */
  lowerBound: number
  /** Closest points found, A's file frame, m. */
  pointA: Vec3
  pointB: Vec3
  /** Original face indices of the closest triangles found (−1 if none examined). */
  faceA: number
  faceB: number
  /** Node pairs visited (diagnostics). */
  pairsVisited: number
}

const _boxB = new Float64Array(6)
const _leafB = new Float64Array(9 * 64)

/**
 * Distance between the SURFACES of mesh A (its file frame) and mesh B placed by x_A = R x_B + t:
 * best-first dual-BVH traversal keyed by the AABB distance of node pairs, exact triangle–triangle
 * distance at leaf pairs. Stops when the smallest key left is ≥ the best distance found (exact
 * result), or after `maxPairs` node pairs, returning the smallest key left as a certified lower
 * bound. Note: a lobe wholly inside the other has positive surface distance.
 */
export function meshDistance(bvhA: ContactBvh, bvhB: ContactBvh, R: Mat3, t: Vec3, maxPairs = Infinity): MeshDistanceResult {
  return meshDistanceRotated(bvhA, rotateB(bvhB, R), t, maxPairs)
}

export function meshDistanceRotated(bvhA: ContactBvh, rb: RotatedB, tIn: Vec3, maxPairs = Infinity): MeshDistanceResult {
  const bvhB = rb.bvh
  const P = Float64Array.from(tIn)
  const heap = new PairHeap()
  const popped = new Int32Array(2)
  let best = Infinity
  const bestPts = new Float64Array(6)
  let faceA = -1, faceB = -1, visited = 0
  let lower = Infinity
  const out = new Float64Array(6)
  placedBox(rb, 0, P, _boxB)
  heap.pushHeap(0, 0, boxDistance(bvhA.box, 0, _boxB, 0))
  while (heap.n > 0) {
    if (heap.key[0] >= best) break
    if (visited >= maxPairs) { lower = heap.key[0]; break }
    heap.pop(popped)
    visited++
    const na = popped[0], nb = popped[1]
    const leafA = bvhA.left[na] === -1, leafB = bvhB.left[nb] === -1
    if (leafA && leafB) {
      const cb = bvhB.count[nb], kb = bvhB.start[nb]
      placeTriangles(rb, kb, cb, P, _leafB)
      for (let ia = 0; ia < bvhA.count[na]; ia++) {
        const ka = bvhA.start[na] + ia
        for (let ib = 0; ib < cb; ib++) {
          const d = triangleTriangleDistance(bvhA.tri, 9 * ka, _leafB, 9 * ib, out)
          if (d < best) { best = d; bestPts.set(out); faceA = bvhA.face[ka]; faceB = bvhB.face[kb + ib] }
        }
      }
      continue
    }
    // Split the larger node of the pair.
    const splitA = !leafA && (leafB || nodeSize(bvhA, na) >= nodeSize(bvhB, nb))
    for (let c = 0; c < 2; c++) {
      const ca = splitA ? (c ? bvhA.right[na] : bvhA.left[na]) : na
      const cbn = splitA ? nb : (c ? bvhB.right[nb] : bvhB.left[nb])
      placedBox(rb, cbn, P, _boxB)
      const l = boxDistance(bvhA.box, 6 * ca, _boxB, 0)
      if (l < best) heap.pushHeap(ca, cbn, l)
    }
  }
  return {
    distance: best,
    lowerBound: Math.min(lower, best),
    pointA: [bestPts[0], bestPts[1], bestPts[2]],
    pointB: [bestPts[3], bestPts[4], bestPts[5]],
    faceA,
    faceB,
    pairsVisited: visited,
  }
}

/** Entry time of box B (moving by t·w) into box A, within [0, tMax]; Infinity if it never enters. */
function sweptBoxEntry(a: Float64Array, oa: number, b: Float64Array, w: Float64Array, tMax: number): number {
  let lo = 0, hi = tMax
  for (let i = 0; i < 3; i++) {
    // Overlap on axis i when b_lo + t w ≤ a_hi and b_hi + t w ≥ a_lo.
    const wi = w[i]
    if (wi === 0) {
      if (b[i] > a[oa + 3 + i] || b[3 + i] < a[oa + i]) return Infinity
      continue
    }
    let t0 = (a[oa + i] - b[3 + i]) / wi
    let t1 = (a[oa + 3 + i] - b[i]) / wi
    if (t0 > t1) { const s = t0; t0 = t1; t1 = s }
    if (t0 > lo) lo = t0
    if (t1 < hi) hi = t1
    if (lo > hi) return Infinity
  }
  return lo
}

interface ToiEvent { t: number, point: Vec3, leafA: number, leafB: number }

/**
 * Exact first contact time of B (placed by P) moving by t·w (unit w) against static A, t ∈ [0, tMax],
 * best-first over node pairs by swept-box entry time. Returns all pair events within `tieTol` of
 * the minimum (several when the touch is at a vertex, an edge or a face patch).
 */
export function sweepTOI(bvhA: ContactBvh, rb: RotatedB, P: Float64Array, w: Vec3, tMax: number, tieTol: number): { t: number, events: ToiEvent[], pairsVisited: number } {
  const W = Float64Array.from(w)
  const heap = new PairHeap()
  const popped = new Int32Array(2)
  const out = new Float64Array(3)
  let best = Infinity
  let events: ToiEvent[] = []
  let visited = 0
  const bvhB = rb.bvh
  placedBox(rb, 0, P, _boxB)
  const e0 = sweptBoxEntry(bvhA.box, 0, _boxB, W, tMax)
  if (e0 !== Infinity) heap.pushHeap(0, 0, e0)
  while (heap.n > 0) {
    const key = heap.pop(popped)
    if (key > best + tieTol) break
    visited++
    const na = popped[0], nb = popped[1]
    const leafA = bvhA.left[na] === -1, leafB = bvhB.left[nb] === -1
    if (leafA && leafB) {
      const cb = bvhB.count[nb], kb = bvhB.start[nb]
      placeTriangles(rb, kb, cb, P, _leafB)
      for (let ia = 0; ia < bvhA.count[na]; ia++) {
        const ka = bvhA.start[na] + ia
        for (let ib = 0; ib < cb; ib++) {
          const t = triangleTriangleTOI(bvhA.tri, 9 * ka, _leafB, 9 * ib, W[0], W[1], W[2], Math.min(tMax, best + tieTol), out)
          if (t === Infinity) continue
          if (t < best - tieTol) events = events.filter(e => e.t <= t + tieTol)
          if (t < best) best = t
          if (t <= best + tieTol) events.push({ t, point: [out[0], out[1], out[2]], leafA: ka, leafB: kb + ib })
        }
      }
      continue
    }
    const splitA = !leafA && (leafB || nodeSize(bvhA, na) >= nodeSize(bvhB, nb))
    const kids: [number, number][] = splitA
      ? [[bvhA.left[na], nb], [bvhA.right[na], nb]]
      : [[na, bvhB.left[nb]], [na, bvhB.right[nb]]]
    for (const [ca, cb] of kids) {
      placedBox(rb, cb, P, _boxB)
      const e = sweptBoxEntry(bvhA.box, 6 * ca, _boxB, W, Math.min(tMax, best + tieTol))
      if (e !== Infinity) heap.pushHeap(ca, cb, e)
    }
  }
  events = events.filter(e => e.t <= best + tieTol)
  return { t: best, events, pairsVisited: visited }
}
