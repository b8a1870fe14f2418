/**
 * Treecode for the gravity of a constant-density closed polyhedron: potential and acceleration at
 * many points in O(N log N) instead of the direct sum's O(N) per point.
 *
 * Method. By the divergence theorem (docs/polyhedral-gravity.md [derived]) the field of a homogeneous body is
 *   U(r) = (Gρ/2) ∮ n̂′·(r′ − r)/|r′ − r| dS′ = (Gρ/2) [Φ₀(r) − r·Φ(r)],   g(r) = −Gρ Φ(r),
 *   Φ₀(r) = ∮ (n̂′·r′)/|r − r′| dS′,   Φ(r) = ∮ n̂′/|r − r′| dS′,
 * four Laplace single-layer potentials whose densities (n̂·r′ = the face plane's offset, and the three
 * components of n̂) are constant on each face. The faces are put in a bounding-volume hierarchy
 * (median splits of face centroids). Every node stores the multipole moments of the four densities
 * (complex solid harmonics, solid-harmonics.ts), exact for its triangles up to the order p
 * (simplexHarmonicSums at the leaves, translated to parent centres: Greengard & Rokhlin 1987,
 * J. Comput. Phys. 73, 325). A target point walks the tree (tree-walk.ts) (Barnes & Hut 1986, Nature 324, 446):
 * a node of radius a at distance d is used through its expansion when a/d < θ and the truncation
 * bound (Q/(d − a))(a/d)^{k+1} [Q = Σ|σ|·area] is below the tolerance for some order k ≤ p (the
 * smallest such k is used); otherwise its children are visited, and the faces of a leaf that fails
 * are evaluated exactly with the face form of Werner & Scheeres 1997 (Celest. Mech. Dyn. Astron.
 * 65, 313): ∫_face dS′/|r′ − r| = Σ_edges (m̂_e·r_e) L_e − (n̂·r_f) ω_f.
 *
 * Accuracy: `accuracy` is the target relative error of |g| (U is held ten times tighter) measured
 * against the field scale at the point (the surface field of the volume-equivalent sphere inside it,
 * falling as 1/r² and 1/r outside). The achieved error is not guaranteed by the bound alone: callers
 * report it from sampled exact (direct-sum) checks (`sampledErrors`).
 *
 * Frames and units: points are in the FILE frame (metres); internally everything is relative to
 * the volume centroid `origin`. U > 0 (m² s⁻²), g = ∇U (m s⁻²), docs/conventions.md.
 */
import type { TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import { factorial } from '../math/special'
import { harmonicCount, simplexHarmonicSums, translateMoments, translationScratch } from './solid-harmonics'

export interface TreecodeOptions {
  /** Target relative error of |g| (U: accuracy/10). Default 1e-7. */
  accuracy?: number
  /** Highest multipole order stored per node. Default 12. */
  order?: number
  /** Largest node radius / distance for which an expansion may be used. Default 0.6. */
  theta?: number
  /** Faces per leaf (at most). Default 32. */
  leafSize?: number
}

export const TREECODE_DEFAULTS = { accuracy: 1e-7, order: 12, theta: 0.6, leafSize: 32 } as const

export interface GravityTree {
  /** Volume centroid, file frame, m. */
  origin: Vec3
  /** Volume, m³. */
  volume: number
  /** Volume-equivalent radius, m (the field scale of the tolerance). */
  equivalentRadius: number
  /** Vertices relative to origin, m. */
  vertices: Float64Array
  /** Faces in tree order (3 vertex indices each). */
  faces: Uint32Array
  /** Tree position → original face index. */
  faceOrder: Uint32Array
  /** Unit outward normals in tree order. */
  normals: Float64Array
  /** n̂·v (m), the face plane offsets from the origin, tree order. */
  offsets: Float64Array
  /** Node arrays: centre (3 per node, relative to origin), radius (m), first face, face count, first child (−1: leaf). */
  nodeCenter: Float64Array
  nodeRadius: Float64Array
  nodeFirst: Uint32Array
  nodeCount: Uint32Array
  nodeChild: Int32Array
  /** Σ area (m²) and Σ |offset|·area (m³) per node: the Q of the truncation bounds. */
  nodeArea: Float64Array
  nodeOffsetArea: Float64Array
  /** Moment slot of a node, −1 for nodes without an expansion (always opened). */
  nodeSlot: Int32Array
  /** Moments: per slot 4 densities × harmonicCount(order) complex, entry-major, m ≥ 1 pre-doubled. */
  moments: Float64Array
  options: Required<TreecodeOptions>
}

/**
 * Builds the tree and the multipole moments of a closed, outward-oriented mesh (run validateMesh
 * first). Cost ~ N·p² for the leaves plus nodes·p⁴ for the translations.
 * @throws GeometryError 'bad-argument' for options out of range.
 */
export function buildGravityTree(mesh: TriMesh, options: TreecodeOptions = {}, onProgress?: (fraction: number) => void): GravityTree {
  const opts = { ...TREECODE_DEFAULTS, ...options }
  if (!(opts.accuracy > 0 && opts.accuracy < 1)) throw new GeometryError('bad-argument', `buildGravityTree: accuracy must be in (0, 1), got ${opts.accuracy}`)
  if (!Number.isInteger(opts.order) || opts.order < 2 || opts.order > 40) throw new GeometryError('bad-argument', `buildGravityTree: order must be an integer in [2, 40], got ${opts.order}`)
  if (!(opts.theta > 0 && opts.theta < 1)) throw new GeometryError('bad-argument', `buildGravityTree: theta must be in (0, 1), got ${opts.theta}`)
  if (!Number.isInteger(opts.leafSize) || opts.leafSize < 1) throw new GeometryError('bad-argument', `buildGravityTree: leafSize must be a positive integer, got ${opts.leafSize}`)
  const P = mesh.positions, I = mesh.indices
  const nv = P.length / 3, nf = I.length / 3
  if (nf < 4) throw new GeometryError('bad-argument', `buildGravityTree: a closed mesh has at least 4 faces, got ${nf}`)

  // volume centroid (relative to the first vertex first, for precision)
  const o0x = P[0]!, o0y = P[1]!, o0z = P[2]!
  let v6 = 0, sx = 0, sy = 0, sz = 0
  for (let f = 0; f < 3 * nf; f += 3) {
    const a = 3 * I[f]!, b = 3 * I[f + 1]!, c = 3 * I[f + 2]!
    const ax = P[a]! - o0x, ay = P[a + 1]! - o0y, az = P[a + 2]! - o0z
    const bx = P[b]! - o0x, by = P[b + 1]! - o0y, bz = P[b + 2]! - o0z
    const cx = P[c]! - o0x, cy = P[c + 1]! - o0y, cz = P[c + 2]! - o0z
    const d = ax * (by * cz - bz * cy) + ay * (bz * cx - bx * cz) + az * (bx * cy - by * cx)
    v6 += d; sx += d * (ax + bx + cx); sy += d * (ay + by + cy); sz += d * (az + bz + cz)
  }
  if (!(v6 > 0)) throw new GeometryError('bad-argument', `buildGravityTree: the mesh encloses volume ${v6 / 6} m³; it must be closed and outward-oriented (validateMesh)`)
  const origin: Vec3 = [o0x + sx / (4 * v6), o0y + sy / (4 * v6), o0z + sz / (4 * v6)]
  const V = new Float64Array(3 * nv)
  for (let v = 0; v < nv; v++) {
    V[3 * v] = P[3 * v]! - origin[0]; V[3 * v + 1] = P[3 * v + 1]! - origin[1]; V[3 * v + 2] = P[3 * v + 2]! - origin[2]
  }

  // face centroids, then the hierarchy by median splits along the widest centroid extent
  const cen = new Float64Array(3 * nf)
  for (let f = 0; f < nf; f++) {
    const a = 3 * I[3 * f]!, b = 3 * I[3 * f + 1]!, c = 3 * I[3 * f + 2]!
    for (let k = 0; k < 3; k++) cen[3 * f + k] = (V[a + k]! + V[b + k]! + V[c + k]!) / 3
  }
  const order = new Uint32Array(nf)
  for (let f = 0; f < nf; f++) order[f] = f
  const maxNodes = 2 * Math.ceil(nf / Math.max(1, Math.floor(opts.leafSize / 2))) + 1
  const first = new Uint32Array(maxNodes), count = new Uint32Array(maxNodes), child = new Int32Array(maxNodes).fill(-1)
  let nodes = 1
  first[0] = 0; count[0] = nf
  const keys = new Float64Array(nf)
  const todo: number[] = [0]
  while (todo.length) {
    const node = todo.pop()!
    const s = first[node]!, n = count[node]!
    if (n <= opts.leafSize) continue
    let lox = Infinity, loy = Infinity, loz = Infinity, hix = -Infinity, hiy = -Infinity, hiz = -Infinity
    for (let i = s; i < s + n; i++) {
      const f = order[i]!
      const x = cen[3 * f]!, y = cen[3 * f + 1]!, z = cen[3 * f + 2]!
      if (x < lox) lox = x; if (x > hix) hix = x
      if (y < loy) loy = y; if (y > hiy) hiy = y
      if (z < loz) loz = z; if (z > hiz) hiz = z
    }
    const ex = hix - lox, ey = hiy - loy, ez = hiz - loz
    const axis = ex >= ey && ex >= ez ? 0 : ey >= ez ? 1 : 2
    const half = n >> 1
    // sort the range by the centroid coordinate (typed-array sort of keys with the face index packed)
    const sub = order.subarray(s, s + n)
    for (let i = 0; i < n; i++) keys[i] = cen[3 * sub[i]! + axis]!
    nthElement(sub, keys, half)
    const l = nodes++, r = nodes++
    first[l] = s; count[l] = half; first[r] = s + half; count[r] = n - half
    child[node] = l
    todo.push(l, r)
  }
  onProgress?.(0.1)

  // faces, normals and plane offsets in tree order
  const faces = new Uint32Array(3 * nf), normals = new Float64Array(3 * nf), offsets = new Float64Array(nf), areas = new Float64Array(nf)
  for (let t = 0; t < nf; t++) {
    const f = order[t]!
    const ia = I[3 * f]!, ib = I[3 * f + 1]!, ic = I[3 * f + 2]!
    faces[3 * t] = ia; faces[3 * t + 1] = ib; faces[3 * t + 2] = ic
    const a = 3 * ia, b = 3 * ib, c = 3 * ic
    const ux = V[b]! - V[a]!, uy = V[b + 1]! - V[a + 1]!, uz = V[b + 2]! - V[a + 2]!
    const wx = V[c]! - V[a]!, wy = V[c + 1]! - V[a + 1]!, wz = V[c + 2]! - V[a + 2]!
    const nx = uy * wz - uz * wy, ny = uz * wx - ux * wz, nz = ux * wy - uy * wx
    const len = Math.hypot(nx, ny, nz)
    if (!(len > 0)) throw new GeometryError('degenerate-face', `buildGravityTree: face ${f} has zero area`)
    normals[3 * t] = nx / len; normals[3 * t + 1] = ny / len; normals[3 * t + 2] = nz / len
    offsets[t] = (nx * V[a]! + ny * V[a + 1]! + nz * V[a + 2]!) / len
    areas[t] = len / 2
  }

  // node centres (vertex bounding-box centres), radii (farthest vertex), Q sums
  const nodeCenter = new Float64Array(3 * nodes), nodeRadius = new Float64Array(nodes), nodeArea = new Float64Array(nodes), nodeOffsetArea = new Float64Array(nodes)
  for (let node = 0; node < nodes; node++) {
    const s = first[node]!, n = count[node]!
    let lox = Infinity, loy = Infinity, loz = Infinity, hix = -Infinity, hiy = -Infinity, hiz = -Infinity, A = 0, QA = 0
    for (let t = s; t < s + n; t++) {
      for (let k = 0; k < 3; k++) {
        const v = 3 * faces[3 * t + k]!
        const x = V[v]!, y = V[v + 1]!, z = V[v + 2]!
        if (x < lox) lox = x; if (x > hix) hix = x
        if (y < loy) loy = y; if (y > hiy) hiy = y
        if (z < loz) loz = z; if (z > hiz) hiz = z
      }
      A += areas[t]!; QA += Math.abs(offsets[t]!) * areas[t]!
    }
    const cx = (lox + hix) / 2, cy = (loy + hiy) / 2, cz = (loz + hiz) / 2
    let r2 = 0
    for (let t = s; t < s + n; t++) {
      for (let k = 0; k < 3; k++) {
        const v = 3 * faces[3 * t + k]!
        const dx = V[v]! - cx, dy = V[v + 1]! - cy, dz = V[v + 2]! - cz
        const d2 = dx * dx + dy * dy + dz * dz
        if (d2 > r2) r2 = d2
      }
    }
    nodeCenter[3 * node] = cx; nodeCenter[3 * node + 1] = cy; nodeCenter[3 * node + 2] = cz
    nodeRadius[node] = Math.sqrt(r2); nodeArea[node] = A; nodeOffsetArea[node] = QA
  }
  onProgress?.(0.2)

  // moments on the leaves and on every third level (the levels between are always opened: a third
  // of the translations of a binary tree): leaves from exact triangle integrals, the others by
  // translating the moments of their nearest descendants that have them (children have larger ids)
  const depth = new Uint8Array(nodes), slot = new Int32Array(nodes).fill(-1)
  let slots = 0
  for (let node = 0; node < nodes; node++) {
    const c = child[node]!
    if (c >= 0) { depth[c] = depth[node]! + 1; depth[c + 1] = depth[node]! + 1 }
    if (c < 0 || depth[node]! % 3 === 0) slot[node] = slots++
  }
  const p = opts.order, T = harmonicCount(p), stride = 8 * T
  const moments = new Float64Array(slots * stride)
  const h = new Float64Array(2 * T), s1 = new Float64Array(2 * T), s2 = new Float64Array(2 * T), ts = translationScratch(p, 4)
  const inv = new Float64Array(p + 1)
  for (let n = 0; n <= p; n++) inv[n] = 1 / factorial(n + 2)
  const below: number[] = []
  let facesDone = 0
  for (let node = nodes - 1; node >= 0; node--) {
    if (slot[node]! < 0) continue
    const base = slot[node]! * stride
    const cx = nodeCenter[3 * node]!, cy = nodeCenter[3 * node + 1]!, cz = nodeCenter[3 * node + 2]!
    const c = child[node]!
    if (c >= 0) {
      below.length = 0
      below.push(c, c + 1)
      while (below.length) {
        const k = below.pop()!
        if (slot[k]! < 0) { below.push(child[k]!, child[k]! + 1); continue }
        translateMoments(moments, slot[k]! * stride, nodeCenter[3 * k]! - cx, nodeCenter[3 * k + 1]! - cy, nodeCenter[3 * k + 2]! - cz, p, 4, moments, base, ts)
      }
      continue
    }
    const s = first[node]!, n = count[node]!
    for (let t = s; t < s + n; t++) {
      const a = 3 * faces[3 * t]!, b = 3 * faces[3 * t + 1]!, cc = 3 * faces[3 * t + 2]!
      simplexHarmonicSums(V[a]! - cx, V[a + 1]! - cy, V[a + 2]! - cz, V[b]! - cx, V[b + 1]! - cy, V[b + 2]! - cz, V[cc]! - cx, V[cc + 1]! - cy, V[cc + 2]! - cz, p, h, s1, s2)
      const twoA = 2 * areas[t]!
      const d0 = offsets[t]!, nx = normals[3 * t]!, ny = normals[3 * t + 1]!, nz = normals[3 * t + 2]!
      for (let deg = 0; deg <= p; deg++) {
        const w = twoA * inv[deg]!
        for (let j = (deg * (deg + 1)) / 2; j <= (deg * (deg + 1)) / 2 + deg; j++) {
          const re = w * h[2 * j]!, im = w * h[2 * j + 1]!
          const o = base + 8 * j
          moments[o] = moments[o]! + d0 * re; moments[o + 1] = moments[o + 1]! + d0 * im
          moments[o + 2] = moments[o + 2]! + nx * re; moments[o + 3] = moments[o + 3]! + nx * im
          moments[o + 4] = moments[o + 4]! + ny * re; moments[o + 5] = moments[o + 5]! + ny * im
          moments[o + 6] = moments[o + 6]! + nz * re; moments[o + 7] = moments[o + 7]! + nz * im
        }
      }
    }
    facesDone += n
    if ((node & 255) === 0) onProgress?.(0.2 + 0.7 * Math.min(1, facesDone / nf))
  }
  // the evaluation sums m ≥ 1 twice (conjugate pairs): double those entries once here
  for (let k = 0; k < slots; k++) {
    for (let deg = 1; deg <= p; deg++) {
      for (let m = 1; m <= deg; m++) {
        const o = k * stride + 8 * ((deg * (deg + 1)) / 2 + m)
        for (let q = 0; q < 8; q++) moments[o + q] = 2 * moments[o + q]!
      }
    }
  }
  onProgress?.(1)
  return {
    origin, volume: v6 / 6, equivalentRadius: Math.cbrt((3 * v6) / (6 * 4 * Math.PI)), vertices: V, faces, faceOrder: order, normals, offsets,
    nodeCenter, nodeRadius, nodeFirst: first.slice(0, nodes), nodeCount: count.slice(0, nodes), nodeChild: child.slice(0, nodes),
    nodeArea, nodeOffsetArea, nodeSlot: slot, moments, options: opts,
  }
}

/** Partial selection: puts the k-th smallest key at position k, smaller before, larger after (keys move with idx). */
function nthElement(idx: Uint32Array, keys: Float64Array, k: number): void {
  let lo = 0, hi = idx.length - 1
  while (hi > lo) {
    const pivot = keys[(lo + hi) >> 1]!
    let i = lo, j = hi
    while (i <= j) {
      while (keys[i]! < pivot) i++
      while (keys[j]! > pivot) j--
      if (i <= j) {
        const tk = keys[i]!; keys[i] = keys[j]!; keys[j] = tk
        const ti = idx[i]!; idx[i] = idx[j]!; idx[j] = ti
        i++; j--
      }
    }
    if (k <= j) hi = j
    else if (k >= i) lo = i
    else return
  }
}

/**
 * The same tree with every typed array on a SharedArrayBuffer, so worker threads receive it by
 * postMessage without a copy (the moments of a million-face mesh are a few hundred MB).
 */
export function shareGravityTree(tree: GravityTree): GravityTree {
  const share = <A extends Float64Array | Uint32Array | Int32Array>(a: A): A => {
    if (a.buffer instanceof SharedArrayBuffer) return a
    const Ctor = a.constructor as new (buffer: SharedArrayBuffer) => A
    const out = new Ctor(new SharedArrayBuffer(a.byteLength))
    out.set(a as never)
    return out
  }
  return {
    ...tree,
    vertices: share(tree.vertices), faces: share(tree.faces), faceOrder: share(tree.faceOrder), normals: share(tree.normals), offsets: share(tree.offsets),
    nodeCenter: share(tree.nodeCenter), nodeRadius: share(tree.nodeRadius), nodeFirst: share(tree.nodeFirst), nodeCount: share(tree.nodeCount),
    nodeChild: share(tree.nodeChild), nodeArea: share(tree.nodeArea), nodeOffsetArea: share(tree.nodeOffsetArea), nodeSlot: share(tree.nodeSlot), moments: share(tree.moments),
  }
}
