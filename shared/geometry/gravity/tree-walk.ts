/**
 * Evaluation of the gravity treecode (tree built by treecode.ts): the walk from a target point that
 * uses a node's multipole expansion where its opening angle and truncation bound allow, and the
 * exact face form of Werner & Scheeres 1997 at the faces of leaves that fail; field chunks for the
 * worker threads. Method, accuracy and frames: treecode.ts and docs/polyhedral-gravity.md.
 */
import { G } from '../mass/mass'
import { harmonicCount, irregularHarmonics } from './solid-harmonics'
import type { GravityTree } from './treecode'

/** Per-evaluation statistics (summed over the points of a call). */
export interface TreecodeStats {
  /** Expansion evaluations and their summed order. */
  expansions: number
  orderSum: number
  /** Faces evaluated exactly. */
  exactFaces: number
}

/** Scratch for one evaluating thread (no allocation per point). */
export interface TreecodeScratch {
  stack: Int32Array
  theta: Float64Array
  stats: TreecodeStats
}

export function treecodeScratch(tree: GravityTree): TreecodeScratch {
  return { stack: new Int32Array(4 * 64 + tree.nodeRadius.length), theta: new Float64Array(2 * harmonicCount(tree.options.order)), stats: { expansions: 0, orderSum: 0, exactFaces: 0 } }
}

/**
 * Φ₀ (m²) and Φ (m, 3 components) at a point relative to the origin, written to out[0..3].
 * U = (Gρ/2)(Φ₀ − r·Φ), g = −GρΦ.
 */
export function treeLayerPotentials(tree: GravityTree, px: number, py: number, pz: number, scratch: TreecodeScratch, out: Float64Array): void {
  const { nodeCenter: NC, nodeRadius: NR, nodeChild: CH, nodeFirst: NF, nodeCount: NN, nodeArea: NA, nodeOffsetArea: NQ, nodeSlot: SL, moments: M, vertices: V, faces: F, normals: Nn, offsets: Off } = tree
  const { accuracy, theta, order } = tree.options
  const T = harmonicCount(order), stride = 8 * T
  const Th = scratch.theta, stack = scratch.stack, stats = scratch.stats
  // tolerances (absolute) from the field scale at the point: |Φ| ≈ (4π/3) R³/max(r, R)², |Φ₀ − r·Φ| ≈ 2·(4π/3)·R³/max(r, R)
  const R = tree.equivalentRadius
  const rr = Math.max(R, Math.sqrt(px * px + py * py + pz * pz))
  // (the bounds are pessimistic: the factors 25 and 0.5 put the measured errors of the test meshes
  // at about half the requested accuracy on |g| and a tenth of it on U)
  const tolG = 25 * accuracy * 4.18879 * R * R * R / (rr * rr)
  const tolU = 0.5 * accuracy * 8.37758 * R * R * R / rr
  let f0 = 0, fx = 0, fy = 0, fz = 0
  let sp = 0
  stack[sp++] = 0
  while (sp > 0) {
    const node = stack[--sp]!
    const dx = px - NC[3 * node]!, dy = py - NC[3 * node + 1]!, dz = pz - NC[3 * node + 2]!
    const d = Math.sqrt(dx * dx + dy * dy + dz * dz)
    const a = NR[node]!
    let k = -1
    if (a < theta * d && SL[node]! >= 0) {
      const rho = a / d
      // smallest k with Q/(d − a)·ρ^{k+1} ≤ tol, for the vector density (Q = area) and the U combination
      const qg = NA[node]! / (d - a), qu = 0.5 * (NQ[node]! + rr * NA[node]!) / (d - a)
      const need = Math.min(tolG / qg, tolU / qu)
      k = need >= 1 ? 0 : Math.ceil(Math.log(need) / Math.log(rho)) - 1
      if (k < 1) k = 1
      if (k > order) k = -1
    }
    if (k > 0) {
      irregularHarmonics(dx, dy, dz, k, Th)
      const base = SL[node]! * stride
      const jn = harmonicCount(k)
      for (let j = 0; j < jn; j++) {
        const tr = Th[2 * j]!, ti = Th[2 * j + 1]!, o = base + 8 * j
        f0 += M[o]! * tr + M[o + 1]! * ti
        fx += M[o + 2]! * tr + M[o + 3]! * ti
        fy += M[o + 4]! * tr + M[o + 5]! * ti
        fz += M[o + 6]! * tr + M[o + 7]! * ti
      }
      stats.expansions++; stats.orderSum += k
      continue
    }
    const c = CH[node]!
    if (c >= 0) {
      stack[sp++] = c; stack[sp++] = c + 1
      continue
    }
    // exact faces: ∫ dS′/|r′ − r| = Σ_e (m̂_e·r_e) L_e − (n̂·r_f) ω_f
    const s = NF[node]!, e = s + NN[node]!
    stats.exactFaces += e - s
    for (let t = s; t < e; t++) {
      const ia = 3 * F[3 * t]!, ib = 3 * F[3 * t + 1]!, ic = 3 * F[3 * t + 2]!
      const ax = V[ia]! - px, ay = V[ia + 1]! - py, az = V[ia + 2]! - pz
      const bx = V[ib]! - px, by = V[ib + 1]! - py, bz = V[ib + 2]! - pz
      const cx = V[ic]! - px, cy = V[ic + 1]! - py, cz = V[ic + 2]! - pz
      const ra = Math.sqrt(ax * ax + ay * ay + az * az), rb = Math.sqrt(bx * bx + by * by + bz * bz), rc = Math.sqrt(cx * cx + cy * cy + cz * cz)
      const nx = Nn[3 * t]!, ny = Nn[3 * t + 1]!, nz = Nn[3 * t + 2]!
      // edges a→b, b→c, c→a; m̂_e·r_e = ((e × n̂)·r_i)/|e| = (n̂ · (r_i × e))/|e|, r_i × e = r_i × r_j
      let sum = 0
      {
        const ex = bx - ax, ey = by - ay, ez = bz - az, len = Math.sqrt(ex * ex + ey * ey + ez * ez), q = ra + rb
        const mr = (nx * (ay * bz - az * by) + ny * (az * bx - ax * bz) + nz * (ax * by - ay * bx)) / len
        sum += mr * Math.log((q + len) / (q - len))
      }
      {
        const ex = cx - bx, ey = cy - by, ez = cz - bz, len = Math.sqrt(ex * ex + ey * ey + ez * ez), q = rb + rc
        const mr = (nx * (by * cz - bz * cy) + ny * (bz * cx - bx * cz) + nz * (bx * cy - by * cx)) / len
        sum += mr * Math.log((q + len) / (q - len))
      }
      {
        const ex = ax - cx, ey = ay - cy, ez = az - cz, len = Math.sqrt(ex * ex + ey * ey + ez * ez), q = rc + ra
        const mr = (nx * (cy * az - cz * ay) + ny * (cz * ax - cx * az) + nz * (cx * ay - cy * ax)) / len
        sum += mr * Math.log((q + len) / (q - len))
      }
      const df = nx * ax + ny * ay + nz * az
      if (df !== 0) {
        const num = ax * (by * cz - bz * cy) + ay * (bz * cx - bx * cz) + az * (bx * cy - by * cx)
        const den = ra * rb * rc + ra * (bx * cx + by * cy + bz * cz) + rb * (cx * ax + cy * ay + cz * az) + rc * (ax * bx + ay * by + az * bz)
        sum -= df * 2 * Math.atan2(num, den)
      }
      f0 += Off[t]! * sum
      fx += nx * sum; fy += ny * sum; fz += nz * sum
    }
  }
  out[0] = f0; out[1] = fx; out[2] = fy; out[3] = fz
}

/**
 * U (m² s⁻²) and g (m s⁻², 3 per point) at points [start, end) (file frame, m, 3 per point), density
 * ρ (kg m⁻³). Writes potential[i] and acceleration[3i..3i+2]; no allocation per point.
 */
export function treeFieldChunk(tree: GravityTree, density: number, points: Float64Array, start: number, end: number,
  potential: Float64Array, acceleration: Float64Array, scratch: TreecodeScratch = treecodeScratch(tree)): void {
  const k = G * density
  const [ox, oy, oz] = tree.origin
  const out = new Float64Array(4)
  for (let i = start; i < end; i++) {
    const x = points[3 * i]! - ox, y = points[3 * i + 1]! - oy, z = points[3 * i + 2]! - oz
    treeLayerPotentials(tree, x, y, z, scratch, out)
    potential[i] = 0.5 * k * (out[0]! - (x * out[1]! + y * out[2]! + z * out[3]!))
    acceleration[3 * i] = -k * out[1]!; acceleration[3 * i + 1] = -k * out[2]!; acceleration[3 * i + 2] = -k * out[3]!
  }
}
