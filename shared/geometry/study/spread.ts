/**
 * Spread of contact-study results under input uncertainty: lobe densities (uniform or normal
 * prior per lobe, normal truncated at 1 kg m⁻³), approach direction uniform in solid angle within a
 * cone about the nominal line, and a common shape-scale factor (uniform or normal prior).
 *
 * Reproducible and chunkable: sample i draws from its own stream createRng(seed, i), so
 * `runSpreadSample(context, i)` can run in any order on any worker; `summariseSpread` combines them.
 *
 * Cheap where the physics allows: density does not change geometry (masses, inertias and speeds are
 * rescaled from unit-density properties), and a uniform scale s maps the geometry exactly
 * (d → s d, neck radius → s r, inertia → s⁵ I), so only the direction needs new geometry (first
 * contact and, if asked, the neck at overlap depth δ/s of the unscaled lobes).
 */
import type { Quat, TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import { ContactBvhCache } from '../contact/bvh'
import { firstContact, meshInContactFrame } from '../contact/first-contact'
import type { MassProperties } from '../mass/mass'
import { massProperties, withDensity } from '../mass/mass'
import { add, anyPerpendicular, cross, normalize, scale } from '../math/linalg'
import type { Rng } from '../math/rng'
import { createRng } from '../math/rng'
import { overlapAndUnion } from '../merge/booleans'
import type { LobeSpin, MassModel } from '../merge/merged'
import { mergedBody } from '../merge/merged'
import { neckAtDepth } from '../neck/neck'
import type { RelativeOrbit } from '../orbit/kinematics'
import { contactKinematics } from '../orbit/kinematics'

export type Prior = { kind: 'fixed', value: number } | { kind: 'uniform', min: number, max: number } | { kind: 'normal', mean: number, std: number }

export interface SpreadSpec {
  seed: number
  samples: number
  densityA: Prior
  densityB: Prior
  /** Cone half-angle about the nominal direction, deg (0 = fixed direction). */
  coneHalfAngleDeg: number
  /** Shape-scale factor prior (1 = nominal size). */
  scale: Prior
  /** Compute the neck per sample (a boolean per sample; default true). */
  neck?: boolean
}

export interface SpreadContext {
  meshA: TriMesh
  meshB: TriMesh
  /** Unit-density lobe properties (file frames). */
  unitA: MassProperties
  unitB: MassProperties
  orientationB: Quat
  direction: Vec3
  orbit: RelativeOrbit
  orbitNormal?: Vec3
  overlapDepth: number
  massModel: MassModel
  spinA?: LobeSpin
  spinB?: LobeSpin
  spec: SpreadSpec
  cache: ContactBvhCache
}

export interface SpreadSample {
  index: number
  densityA: number
  densityB: number
  scale: number
  direction: Vec3
  contact: boolean
  speed: number | null
  escapeSpeed: number | null
  spinPeriod: number | null
  neckRadius: number | null
  mergedJ2: number | null
}

export interface SpreadSummaryEntry { min: number, median: number, max: number, mean: number, std: number, n: number }
export interface SpreadSummary {
  seed: number
  samples: number
  contacts: number
  speed: SpreadSummaryEntry | null
  escapeSpeed: SpreadSummaryEntry | null
  spinPeriod: SpreadSummaryEntry | null
  neckRadius: SpreadSummaryEntry | null
  mergedJ2: SpreadSummaryEntry | null
  priors: string
}

function draw(p: Prior, rng: Rng, floor: number): number {
  if (p.kind === 'fixed') return p.value
  if (p.kind === 'uniform') return rng.uniform(p.min, p.max)
  for (let i = 0; i < 100; i++) {
    const v = rng.normal(p.mean, p.std)
    if (v >= floor) return v
  }
  return Math.max(p.mean, floor)
}

/** Unit vector uniform in solid angle within `halfAngleDeg` of unit `axis`. */
export function sampleCone(axis: Vec3, halfAngleDeg: number, rng: Rng): Vec3 {
  const u = normalize(axis)
  if (halfAngleDeg <= 0) return u
  const cosMax = Math.cos(halfAngleDeg * Math.PI / 180)
  const c = 1 - rng.next() * (1 - cosMax)
  const s = Math.sqrt(Math.max(0, 1 - c * c))
  const phi = 2 * Math.PI * rng.next()
  const e1 = anyPerpendicular(u), e2 = cross(u, e1)
  return normalize(add(scale(u, c), add(scale(e1, s * Math.cos(phi)), scale(e2, s * Math.sin(phi)))))
}

/** Build the reusable context (unit-density properties, BVH cache). */
export function createSpreadContext(c: Omit<SpreadContext, 'unitA' | 'unitB' | 'cache'> & { cache?: ContactBvhCache }): SpreadContext {
  return { ...c, unitA: massProperties(c.meshA, { density: 1 }), unitB: massProperties(c.meshB, { density: 1 }), cache: c.cache ?? new ContactBvhCache() }
}

/** Scale mass properties of a geometry by a uniform length factor s (density unchanged). */
function scaleProps(p: MassProperties, s: number): MassProperties {
  const s5 = s ** 5
  return {
    ...p,
    volume: p.volume * s ** 3,
    mass: p.mass * s ** 3,
    centroid: scale(p.centroid, s),
    inertia: p.inertia.map(r => r.map(v => v * s5)) as MassProperties['inertia'],
    principalMoments: p.principalMoments.map(v => v * s5) as Vec3,
    equivalentRadius: p.equivalentRadius * s,
    referenceRadius: p.referenceRadius * s,
    deeveSemiAxes: p.deeveSemiAxes.map(v => v * s) as Vec3,
  }
}

/** One spread sample (pure given the context and index). */
export async function runSpreadSample(ctx: SpreadContext, index: number): Promise<SpreadSample> {
  const rng = createRng(ctx.spec.seed, index)
  const rhoA = draw(ctx.spec.densityA, rng, 1)
  const rhoB = draw(ctx.spec.densityB, rng, 1)
  const s = draw(ctx.spec.scale, rng, 1e-3)
  const dir = sampleCone(ctx.direction, ctx.spec.coneHalfAngleDeg, rng)
  const fc = firstContact({ meshA: ctx.meshA, meshB: ctx.meshB, centroidA: ctx.unitA.centroid, centroidB: ctx.unitB.centroid, orientationB: ctx.orientationB, direction: dir }, { cache: ctx.cache })
  const pA = scaleProps(withDensity(ctx.unitA, rhoA), s)
  const pB = scaleProps(withDensity(ctx.unitB, rhoB), s)
  const d = fc.separation * s
  const kin = contactKinematics({
    massA: pA.mass, massB: pB.mass, separation: d, direction: fc.direction, orbitNormal: ctx.orbitNormal, largestMomentAxisA: pA.principalAxes[2],
    contactNormal: fc.normalA, equivalentRadiusA: pA.equivalentRadius, equivalentRadiusB: pB.equivalentRadius, orbit: ctx.orbit,
  })
  const base: SpreadSample = { index, densityA: rhoA, densityB: rhoB, scale: s, direction: dir, contact: kin.contact, speed: null, escapeSpeed: null, spinPeriod: null, neckRadius: null, mergedJ2: null }
  if (!kin.contact) return base
  base.speed = kin.speed
  base.escapeSpeed = kin.escapeSpeed
  // Geometry at unit scale: depth δ/s.
  const depth = ctx.overlapDepth / s
  const Ac = meshInContactFrame(ctx.meshA, ctx.unitA.centroid)
  // The overlap lens (unit scale) for the two-density merged body: A at ρ_A plus B∖A at ρ_B.
  let lens: TriMesh | null = null
  let neckArea = 0
  if (depth > 0 && (ctx.spec.neck ?? true)) {
    const smaller = Math.min(ctx.unitA.equivalentRadius, ctx.unitB.equivalentRadius)
    const r = await neckAtDepth({ meshAContact: Ac, meshB: ctx.meshB, poseB: fc.poseB, direction: fc.direction, separation: fc.separation, contactPoint: fc.point, contactNormal: fc.normalA, smallerLobeRadius: smaller }, depth, { tilt: false, scanSteps: 25 })
    lens = r.intersection
    neckArea = r.neck.area * s * s
    base.neckRadius = r.neck.equivalentRadius * s
  }
  else if (depth > 0) {
    lens = (await overlapAndUnion(Ac, ctx.meshB, fc.poseB, fc.direction, depth)).intersection
  }
  else {
    base.neckRadius = 0
  }
  // B's pose at the overlap depth, then everything scaled by s (centroids ∝ s, lens positions ∝ s).
  const t = fc.poseB.translation
  const u = fc.direction
  const poseB = { quaternion: fc.poseB.quaternion, translation: [(t[0] - u[0] * depth) * s, (t[1] - u[1] * depth) * s, (t[2] - u[2] * depth) * s] as Vec3 }
  const scaledLens: TriMesh | null = lens ? { positions: lens.positions.map(v => v * s), indices: lens.indices } : null
  const merged = mergedBody({
    overlap: scaledLens, propsA: pA, propsB: pB, poseB, massModel: ctx.massModel, orbitalAngularMomentum: kin.orbitalAngularMomentum,
    orbitalAngularRate: kin.orbitalAngularRate, orbitNormal: kin.orbitNormal, direction: fc.direction, separation: d - ctx.overlapDepth, neckArea, spinA: ctx.spinA, spinB: ctx.spinB,
  })
  base.spinPeriod = merged.spinPeriod
  base.mergedJ2 = merged.J2
  return base
}

function summary(values: number[]): SpreadSummaryEntry | null {
  const v = values.filter(Number.isFinite).sort((a, b) => a - b)
  const n = v.length
  if (n === 0) return null
  const mean = v.reduce((a, b) => a + b, 0) / n
  const std = n > 1 ? Math.sqrt(v.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1)) : 0
  const median = n % 2 ? v[(n - 1) / 2] : (v[n / 2 - 1] + v[n / 2]) / 2
  return { min: v[0], median, max: v[n - 1], mean, std, n }
}

/** Summaries per quantity over the samples that made contact (std: sample standard deviation). */
export function summariseSpread(spec: SpreadSpec, samples: SpreadSample[]): SpreadSummary {
  const ok = samples.filter(s => s.contact)
  const pick = (k: keyof SpreadSample) => ok.map(s => s[k] as number | null).filter((x): x is number => x !== null)
  return {
    seed: spec.seed,
    samples: samples.length,
    contacts: ok.length,
    speed: summary(pick('speed')),
    escapeSpeed: summary(pick('escapeSpeed')),
    spinPeriod: summary(pick('spinPeriod')),
    neckRadius: summary(pick('neckRadius')),
    mergedJ2: summary(pick('mergedJ2')),
    priors: `densityA ${JSON.stringify(spec.densityA)}, densityB ${JSON.stringify(spec.densityB)} (normal priors truncated at 1 kg m^-3), `
      + `direction uniform in solid angle within ${spec.coneHalfAngleDeg} deg, scale ${JSON.stringify(spec.scale)}`,
  }
}

/** Run all samples in this thread (the server splits indices across its workers instead). */
export async function runSpread(ctx: SpreadContext, signal?: AbortSignal, onSample?: (done: number) => void): Promise<{ summary: SpreadSummary, samples: SpreadSample[] }> {
  const samples: SpreadSample[] = []
  for (let i = 0; i < ctx.spec.samples; i++) {
    if (signal?.aborted) throw new GeometryError('aborted', 'runSpread: cancelled')
    samples.push(await runSpreadSample(ctx, i))
    onSample?.(i + 1)
  }
  return { summary: summariseSpread(ctx.spec, samples), samples }
}
