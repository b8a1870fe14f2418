/**
 * Edge incidence of triangle meshes on typed arrays: the closed-oriented-manifold fast check and
 * the half-edge pairing (boundary, non-manifold and same-direction edges). No per-edge objects.
 */
import { MAX_LISTED } from '../types'

/**
 * True when the triangles I form a closed, consistently wound surface that is manifold at every
 * edge and every vertex: exactly what the edge analysis (no boundary, no non-manifold and no
 * same-direction edge) followed by the vertex-fan check accepts, without building half-edge
 * twins. Algorithm: a counting sort files each face corner under its vertex v as the pair
 * (next, previous) of the face's other vertices; around v, "previous of one face = next of the
 * following face" must link the pairs into one cycle through all of them. Every out-going edge v → w is then unique, matched by exactly one w → v, and the faces at
 * v form a single disk; vertices used by no face are ignored. Degenerate faces (a repeated vertex)
 * give false. Memory: 8 bytes per corner plus 4 per vertex, freed on return.
 */
export function closedOrientedManifold(I: Uint32Array, nv: number): boolean {
  const nh = I.length
  const start = new Uint32Array(nv + 1)
  for (let f = 0; f < nh; f += CORNER_BLOCK) if (!countCorners(I, f, Math.min(nh, f + CORNER_BLOCK), start)) return false
  for (let v = 0; v < nv; v++) start[v + 1] = start[v + 1]! + start[v]!
  // pairs[2k], pairs[2k + 1]: next and previous vertex of the k-th corner filed; the fill cursor
  // of vertex v starts at start[v] and ends at start[v + 1]
  const pairs = new Uint32Array(2 * nh)
  const cursor = start.slice(0, nv)
  for (let f = 0; f < nh; f += CORNER_BLOCK) fileCorners(I, f, Math.min(nh, f + CORNER_BLOCK), cursor, pairs)
  for (let v = 0; v < nv; v += VERTEX_BLOCK) if (!singleFans(start, pairs, v, Math.min(nv, v + VERTEX_BLOCK))) return false
  return true
}

/** Indices per call of the corner block functions; vertices per call of `singleFans`. */
export const CORNER_BLOCK = 3 * 16384
const VERTEX_BLOCK = 16384

/** Counts the corners of faces [from, to) (× 3) per vertex into start[v + 1]; false at a face with a repeated vertex. */
function countCorners(I: Uint32Array, from: number, to: number, start: Uint32Array): boolean {
  for (let h = from; h < to; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    if (a === b || b === c || c === a) return false
    start[a + 1]!++; start[b + 1]!++; start[c + 1]!++
  }
  return true
}

/** Files the corners of faces [from, to) (× 3) as (next, previous) pairs at their vertex's cursor. */
function fileCorners(I: Uint32Array, from: number, to: number, cursor: Uint32Array, pairs: Uint32Array): void {
  for (let h = from; h < to; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    let k = 2 * cursor[a]!++
    pairs[k] = b; pairs[k + 1] = c
    k = 2 * cursor[b]!++
    pairs[k] = c; pairs[k + 1] = a
    k = 2 * cursor[c]!++
    pairs[k] = a; pairs[k + 1] = b
  }
}

/** Vertices [from, to) of `closedOrientedManifold`: does each one's corners link into a single cycle? */
function singleFans(start: Uint32Array, pairs: Uint32Array, from: number, to: number): boolean {
  for (let v = from; v < to; v++) {
    const s = 2 * start[v]!, e = 2 * start[v + 1]!
    if (s === e) continue
    // From the first corner, step to the first corner whose next vertex is this corner's previous
    // one. The walk is deterministic, so returning to the start after exactly as many steps as
    // there are corners means it met every corner once; each was then the first match of its next
    // vertex, so no two corners share a next vertex (nor, through the cycle, a previous one).
    let k = s, steps = 0
    do {
      const w = pairs[k + 1]!
      let j = s
      while (j < e && pairs[j] !== w) j += 2
      if (j === e) return false
      k = j
      steps += 2
    } while (k !== s && steps <= e - s)
    if (k !== s || steps !== e - s) return false
  }
  return true
}

export interface EdgeAnalysis {
  /** Other half-edge on the same edge, or −1 (boundary / non-manifold). Half-edge 3f+k runs from corner k to k+1 of face f. */
  twin: Int32Array
  /** 1 when the twin runs in the same direction (inconsistent winding); empty when sameDirEdges is 0. */
  sameDir: Uint8Array
  /** Paired edges whose two half-edges run the same way (0: winding consistent everywhere). */
  sameDirEdges: number
  boundary: number
  nonManifold: number
  /** Faces of the first boundary half-edges, ordered by (source vertex, half-edge id). */
  boundaryFaces: number[]
  /** Faces of the first non-manifold edges (each named by its lowest half-edge), same order. */
  nonManifoldFaces: number[]
}

/**
 * Edge incidence. Algorithm: a counting sort puts every half-edge h (stored as its id) into the
 * bucket of its smaller end vertex (CSR, buckets in vertex order, ids ascending inside a bucket,
 * larger end stored beside each id);
 * all half-edges of one edge then share a bucket of ~6 entries and are matched there by their
 * larger end. An edge with two half-edges is paired (same direction → `sameDir`), with one it is a
 * boundary edge, with more it is non-manifold. Memory: the buckets (8 bytes per half-edge, freed
 * on return) besides the result (5 bytes per half-edge). `skipDegenerate` ignores half-edges with equal ends.
 */
export function analyseEdges(I: Uint32Array, nv: number, skipDegenerate = false): EdgeAnalysis {
  return pairClosedConsistent(I, nv) ?? pairEdges(I, nv, skipDegenerate)
}

/**
 * Fast path for the usual input, a closed mesh wound consistently: every edge a–b is crossed once
 * as a → b and once as b → a. Only rising half-edges (lower → higher vertex) are bucketed, by
 * their lower end (counting sort, larger end stored beside each id); each falling half-edge then
 * looks in its lower end's bucket for its mate. Returns undefined as soon as the mesh is not of
 * this kind (a degenerate half-edge, more rising than falling half-edges, a falling one with no
 * or two candidate mates, a rising one claimed twice); the general pairing then decides. When it
 * succeeds every rising half-edge was claimed exactly once, so each edge has exactly one
 * half-edge each way: the result is the one the general pairing would give.
 */
function pairClosedConsistent(I: Uint32Array, nv: number): EdgeAnalysis | undefined {
  const nh = I.length
  const start = new Uint32Array(nv + 1)
  for (let h = 0; h < nh; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    if (a === b || b === c || c === a) return undefined
    if (a < b) start[a + 1]!++
    if (b < c) start[b + 1]!++
    if (c < a) start[c + 1]!++
  }
  for (let v = 0; v < nv; v++) start[v + 1] = start[v + 1]! + start[v]!
  if (2 * start[nv]! !== nh) return undefined
  const twin = new Int32Array(nh)
  const bucket = new Uint32Array(nh / 2), upper = new Uint32Array(nh / 2)
  for (let h = 0; h < nh; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    if (a < b) putRising(start, bucket, upper, twin, h, a, b)
    if (b < c) putRising(start, bucket, upper, twin, h + 1, b, c)
    if (c < a) putRising(start, bucket, upper, twin, h + 2, c, a)
  }
  // bucket of vertex v is now bucket[start[v−1] .. start[v]) (start[−1] read as 0)
  for (let h = 0; h < nh; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    if (a > b && !claimMate(start, bucket, upper, twin, h, b, a)) return undefined
    if (b > c && !claimMate(start, bucket, upper, twin, h + 1, c, b)) return undefined
    if (c > a && !claimMate(start, bucket, upper, twin, h + 2, a, c)) return undefined
  }
  return { twin, sameDir: NO_SAME_DIR, sameDirEdges: 0, boundary: 0, nonManifold: 0, boundaryFaces: [], nonManifoldFaces: [] }
}

/** `sameDir` of a pairing with no same-direction edge (shared, never written). */
const NO_SAME_DIR = new Uint8Array(0)

/** Files rising half-edge h (lo → hi) in bucket lo, not yet claimed. */
function putRising(start: Uint32Array, bucket: Uint32Array, upper: Uint32Array, twin: Int32Array, h: number, lo: number, hi: number): void {
  const k = start[lo]!++
  bucket[k] = h
  upper[k] = hi
  twin[h] = -1
}

/**
 * Falling half-edge h (hi → lo) claims the single rising lo → hi in bucket lo; false when there is
 * none, more than one, or it was already claimed.
 */
function claimMate(start: Uint32Array, bucket: Uint32Array, upper: Uint32Array, twin: Int32Array, h: number, lo: number, hi: number): boolean {
  let mate = -1
  for (let k = lo === 0 ? 0 : start[lo - 1]!, k1 = start[lo]!; k < k1; k++) {
    if (upper[k] === hi) { if (mate !== -1) return false; mate = bucket[k]! }
  }
  if (mate === -1 || twin[mate] !== -1) return false
  twin[h] = mate
  twin[mate] = h
  return true
}

/** General pairing (see `analyseEdges`): any mix of boundary, non-manifold and same-direction edges. */
function pairEdges(I: Uint32Array, nv: number, skipDegenerate: boolean): EdgeAnalysis {
  const nh = I.length
  const twin = new Int32Array(nh) // every entry is written below: −1 for skipped and unpaired half-edges
  const { start, bucket, upper } = bucketByLowerEnd(I, nv, skipDegenerate, twin)
  const sameDir = new Uint8Array(nh)
  let boundary = 0, nonManifold = 0, sameDirEdges = 0
  const boundaryHe: number[] = [], nonManifoldHe: number[] = []
  for (let v = 0; v < nv; v++) {
    const s0 = v === 0 ? 0 : start[v - 1]!, s1 = start[v]!
    for (let i = s0; i < s1; i++) {
      const b = upper[i]! >>> 1
      let seen = false // an earlier entry of this bucket already handled the edge v–b
      for (let j = s0; j < i; j++) if (upper[j]! >>> 1 === b) { seen = true; break }
      if (seen) continue
      const h = bucket[i]!
      let count = 1, mate = -1, mateDir = 0
      for (let j = i + 1; j < s1; j++) if (upper[j]! >>> 1 === b) { count++; mate = bucket[j]!; mateDir = upper[j]! & 1 }
      if (count === 2) {
        twin[h] = mate; twin[mate] = h
        if ((upper[i]! & 1) === mateDir) { sameDir[h] = 1; sameDir[mate] = 1; sameDirEdges++ }
      } else if (count === 1) {
        twin[h] = -1
        boundary++
        keepFirst(boundaryHe, h, I)
      } else {
        twin[h] = -1
        for (let j = i + 1; j < s1; j++) if (upper[j]! >>> 1 === b) twin[bucket[j]!] = -1
        nonManifold++
        keepFirst(nonManifoldHe, h, I) // h is the edge's lowest half-edge id (ids ascend in a bucket)
      }
    }
  }
  const faceOf = (h: number) => (h / 3) | 0
  return { twin, sameDir, sameDirEdges, boundary, nonManifold, boundaryFaces: boundaryHe.map(faceOf), nonManifoldFaces: nonManifoldHe.map(faceOf) }
}

/**
 * Counting sort of half-edge ids by their smaller end vertex. On return bucket v is
 * bucket[start[v−1] .. start[v]) (start[−1] read as 0): the fill cursor ends at the next bucket.
 * upper[k] is 2 × (larger end of half-edge bucket[k]) + (1 when it runs from the larger end),
 * stored so that the matching reads no face. Skipped (degenerate) half-edges get twin −1.
 */
function bucketByLowerEnd(I: Uint32Array, nv: number, skipDegenerate: boolean, twin: Int32Array) {
  const nh = I.length
  const start = new Uint32Array(nv + 1)
  for (let h = 0; h < nh; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    if (!skipDegenerate || a !== b) start[(a < b ? a : b) + 1]!++
    if (!skipDegenerate || b !== c) start[(b < c ? b : c) + 1]!++
    if (!skipDegenerate || c !== a) start[(c < a ? c : a) + 1]!++
  }
  for (let v = 0; v < nv; v++) start[v + 1] = start[v + 1]! + start[v]!
  const bucket = new Uint32Array(start[nv]!)
  const upper = new Uint32Array(start[nv]!)
  for (let h = 0; h < nh; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    if (!skipDegenerate || a !== b) place(start, bucket, upper, h, a, b); else twin[h] = -1
    if (!skipDegenerate || b !== c) place(start, bucket, upper, h + 1, b, c); else twin[h + 1] = -1
    if (!skipDegenerate || c !== a) place(start, bucket, upper, h + 2, c, a); else twin[h + 2] = -1
  }
  return { start, bucket, upper }
}

/** Puts half-edge h (a → b) at the fill cursor of its lower end's bucket. */
function place(start: Uint32Array, bucket: Uint32Array, upper: Uint32Array, h: number, a: number, b: number): void {
  const k = start[a < b ? a : b]!++
  bucket[k] = h
  upper[k] = a < b ? 2 * b : 2 * a + 1
}

/**
 * Keeps in `list` the MAX_LISTED half-edges that come first in the order (source vertex I[h], h),
 * the order in which a vertex-by-vertex scan of out-going half-edges would meet them.
 */
function keepFirst(list: number[], h: number, I: Uint32Array): void {
  const before = (x: number, y: number) => I[x]! < I[y]! || (I[x] === I[y] && x < y)
  if (list.length === MAX_LISTED && !before(h, list[MAX_LISTED - 1]!)) return
  let i = list.length
  list.push(h)
  while (i > 0 && before(h, list[i - 1]!)) { list[i] = list[i - 1]!; i-- }
  list[i] = h
  if (list.length > MAX_LISTED) list.pop()
}
