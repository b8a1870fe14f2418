/**
 * Surface fields at every face of a mesh (its face centroids), from the treecode, with the
 * conventions they depend on, and the sampled exact check of the treecode's error.
 *
 * Conventions (docs/conventions.md): U > 0 is the gravitational potential, g = ∇U. With a spin ω (rad s⁻¹,
 * file-frame components) about an axis through the volume centroid, the centrifugal acceleration is
 * −ω × (ω × r) and the effective potential U + ½|ω × r|², r from the centroid.
 *   - gravitationalPotential U, gravity |g|, slopeNonRotatingDeg: gravity alone (non-rotating);
 *   - effectivePotential, effectiveGravity |g − ω × (ω × r)|, slopeDeg: with the spin (equal to the
 *     former without one);
 *   - slope: angle between −n̂ (n̂ the face's outward unit normal) and the acceleration, degrees;
 *   - escapeSpeed √(2U): inertial escape speed with the body not spinning; escapeSpeedAlongRotation
 *     max(0, √(2U) − |ω × r|): relative to the rotating surface, launched along its own velocity;
 *   - geopotentialHeight (U_eff,max − U_eff)/ḡ with ḡ the area-weighted mean of effectiveGravity.
 */
import type { TriMesh, Vec3 } from '../types'
import { G } from '../mass/mass'
import { preparePolyhedron, potentialAndAcceleration } from './polyhedron'
import type { GravityTree } from './treecode'
import type { TreecodeScratch } from './tree-walk'
import { treeLayerPotentials, treecodeScratch } from './tree-walk'

export const FACE_FIELD_KEYS = ['gravitationalPotential', 'effectivePotential', 'gravity', 'effectiveGravity', 'slopeDeg', 'slopeNonRotatingDeg', 'escapeSpeed', 'escapeSpeedAlongRotation'] as const
export type FaceFieldKey = typeof FACE_FIELD_KEYS[number]
export type FaceFields = Record<FaceFieldKey, Float64Array>

export const FACE_FIELD_UNITS: Record<FaceFieldKey | 'geopotentialHeight', string> = {
  gravitationalPotential: 'm^2 s^-2', effectivePotential: 'm^2 s^-2', gravity: 'm s^-2', effectiveGravity: 'm s^-2',
  slopeDeg: 'deg', slopeNonRotatingDeg: 'deg', escapeSpeed: 'm s^-1', escapeSpeedAlongRotation: 'm s^-1', geopotentialHeight: 'm',
}

export function allocateFaceFields(n: number): FaceFields {
  return Object.fromEntries(FACE_FIELD_KEYS.map(k => [k, new Float64Array(n)])) as FaceFields
}

/** Face centroids, unit outward normals (3 per face, file frame, m) and areas (m²) of a mesh. */
export function faceCentroids(mesh: TriMesh): { points: Float64Array, normals: Float64Array, areas: Float64Array } {
  const P = mesh.positions, I = mesh.indices, nf = I.length / 3
  const points = new Float64Array(3 * nf), normals = new Float64Array(3 * nf), areas = new Float64Array(nf)
  for (let f = 0; f < nf; f++) {
    const a = 3 * I[3 * f]!, b = 3 * I[3 * f + 1]!, c = 3 * I[3 * f + 2]!
    const ux = P[b]! - P[a]!, uy = P[b + 1]! - P[a + 1]!, uz = P[b + 2]! - P[a + 2]!
    const wx = P[c]! - P[a]!, wy = P[c + 1]! - P[a + 1]!, wz = P[c + 2]! - P[a + 2]!
    const nx = uy * wz - uz * wy, ny = uz * wx - ux * wz, nz = ux * wy - uy * wx
    const len = Math.hypot(nx, ny, nz)
    for (let k = 0; k < 3; k++) points[3 * f + k] = (P[a + k]! + P[b + k]! + P[c + k]!) / 3
    normals[3 * f] = nx / len; normals[3 * f + 1] = ny / len; normals[3 * f + 2] = nz / len
    areas[f] = len / 2
  }
  return { points, normals, areas }
}

/**
 * Fields at points [start, end) (file frame, m; unit outward normals), density ρ (kg m⁻³), spin ω
 * (rad s⁻¹, file-frame components, about the tree's origin) or null. Writes out[key][i - outOffset].
 */
export function faceFieldChunk(tree: GravityTree, density: number, points: Float64Array, normals: Float64Array, omega: Vec3 | null,
  start: number, end: number, out: FaceFields, outOffset = 0, scratch: TreecodeScratch = treecodeScratch(tree), onProgress?: (fraction: number) => void): void {
  const k = G * density
  const [ox, oy, oz] = tree.origin
  const [wx, wy, wz] = omega ?? [0, 0, 0]
  const phi = new Float64Array(4)
  const step = Math.max(1, Math.ceil((end - start) / 20))
  for (let i = start; i < end; i++) {
    const rx = points[3 * i]! - ox, ry = points[3 * i + 1]! - oy, rz = points[3 * i + 2]! - oz
    treeLayerPotentials(tree, rx, ry, rz, scratch, phi)
    const U = 0.5 * k * (phi[0]! - (rx * phi[1]! + ry * phi[2]! + rz * phi[3]!))
    const gx = -k * phi[1]!, gy = -k * phi[2]!, gz = -k * phi[3]!
    const vx = wy * rz - wz * ry, vy = wz * rx - wx * rz, vz = wx * ry - wy * rx // ω × r
    const ax = gx - (wy * vz - wz * vy), ay = gy - (wz * vx - wx * vz), az = gz - (wx * vy - wy * vx)
    const nx = normals[3 * i]!, ny = normals[3 * i + 1]!, nz = normals[3 * i + 2]!
    const gm = Math.hypot(gx, gy, gz), am = Math.hypot(ax, ay, az)
    const j = i - outOffset
    out.gravitationalPotential[j] = U
    out.effectivePotential[j] = U + 0.5 * (vx * vx + vy * vy + vz * vz)
    out.gravity[j] = gm
    out.effectiveGravity[j] = am
    out.slopeNonRotatingDeg[j] = slope(-(nx * gx + ny * gy + nz * gz), gm)
    out.slopeDeg[j] = slope(-(nx * ax + ny * ay + nz * az), am)
    const esc = Math.sqrt(2 * Math.max(0, U))
    out.escapeSpeed[j] = esc
    out.escapeSpeedAlongRotation[j] = Math.max(0, esc - Math.hypot(vx, vy, vz))
    if (onProgress && (i - start + 1) % step === 0) onProgress((i - start + 1) / (end - start))
  }
}

function slope(cosTimesMag: number, mag: number): number {
  if (!(mag > 0)) return 0
  return (Math.acos(Math.min(1, Math.max(-1, cosTimesMag / mag))) * 180) / Math.PI
}

/**
 * Geopotential height (U_eff,max − U_eff)/ḡ (m, ≥ 0: height above the point of highest effective
 * potential, the "lowest" point), ḡ = area-weighted mean of effectiveGravity (m s⁻², returned).
 */
export function geopotentialHeight(effectivePotential: Float64Array, effectiveGravity: Float64Array, areas: Float64Array): { height: Float64Array, meanGravity: number } {
  let uMax = -Infinity, s = 0, w = 0
  for (let i = 0; i < effectivePotential.length; i++) {
    if (effectivePotential[i]! > uMax) uMax = effectivePotential[i]!
    s += effectiveGravity[i]! * areas[i]!; w += areas[i]!
  }
  const meanGravity = s / w
  const height = new Float64Array(effectivePotential.length)
  for (let i = 0; i < height.length; i++) height[i] = (uMax - effectivePotential[i]!) / meanGravity
  return { height, meanGravity }
}

/** Indices of `count` sample points spread over [0, n) (evenly spaced, deterministic). */
export function sampleIndices(n: number, count: number): Uint32Array {
  const m = Math.min(n, Math.max(1, count))
  const out = new Uint32Array(m)
  for (let i = 0; i < m; i++) out[i] = Math.min(n - 1, Math.floor(((i + 0.5) * n) / m))
  return out
}

export interface TreecodeErrorEstimate {
  /** Points checked against the direct Werner & Scheeres sum. */
  samples: number
  /** Largest relative errors over the samples: |ΔU|/U, ||g_tree| − |g||/|g|, |Δg|/|g| (vector). */
  maxRelativePotential: number
  maxRelativeGravity: number
  maxRelativeAcceleration: number
  method: string
}

/**
 * Direct-sum values (U, g; the Werner & Scheeres kernel) at the given sample points, for comparing
 * with the treecode. Returns 4 numbers per sample: U, gx, gy, gz.
 */
export function directSamples(mesh: TriMesh, density: number, points: Float64Array, indices: ArrayLike<number>): Float64Array {
  const model = preparePolyhedron(mesh)
  const out = new Float64Array(4 * indices.length)
  const g: Vec3 = [0, 0, 0]
  for (let s = 0; s < indices.length; s++) {
    const i = indices[s]!
    out[4 * s] = potentialAndAcceleration(model, density, [points[3 * i]!, points[3 * i + 1]!, points[3 * i + 2]!], g)
    out[4 * s + 1] = g[0]; out[4 * s + 2] = g[1]; out[4 * s + 3] = g[2]
  }
  return out
}

/**
 * Compares treecode values with direct samples (`directSamples`): U (m² s⁻²) and g (3 per point) from
 * the treecode at the same indices.
 */
export function compareWithDirect(direct: Float64Array, indices: ArrayLike<number>, potential: ArrayLike<number>, acceleration: ArrayLike<number> | null, gravity: ArrayLike<number> | null): TreecodeErrorEstimate {
  let eu = 0, eg = 0, ea = 0
  for (let s = 0; s < indices.length; s++) {
    const i = indices[s]!
    const U = direct[4 * s]!, gx = direct[4 * s + 1]!, gy = direct[4 * s + 2]!, gz = direct[4 * s + 3]!
    const gm = Math.hypot(gx, gy, gz)
    eu = Math.max(eu, Math.abs(potential[i]! - U) / Math.abs(U))
    if (gravity) eg = Math.max(eg, Math.abs(gravity[i]! - gm) / gm)
    if (acceleration) {
      ea = Math.max(ea, Math.hypot(acceleration[3 * i]! - gx, acceleration[3 * i + 1]! - gy, acceleration[3 * i + 2]! - gz) / gm)
      if (!gravity) eg = Math.max(eg, Math.abs(Math.hypot(acceleration[3 * i]!, acceleration[3 * i + 1]!, acceleration[3 * i + 2]!) - gm) / gm)
    }
  }
  return {
    samples: indices.length, maxRelativePotential: eu, maxRelativeGravity: eg, maxRelativeAcceleration: acceleration ? ea : Number.NaN,
    method: 'treecode values at evenly spaced sample faces compared with the direct Werner & Scheeres (1997) sum over every face and edge',
  }
}
