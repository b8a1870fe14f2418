/**
 * `runContactStudy`: the whole contact study for two lobe meshes — first contact, kinematics,
 * full-shape mutual potential, neck and union at the chosen overlap, merged body, neck sweep,
 * pathway screen and spread — with progress reports and cooperative cancellation.
 * Frames: contact frame (A's file axes, origin at A's centroid). SI units.
 */
import type { Quat, TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import { ContactBvhCache } from '../contact/bvh'
import type { Pose } from '../contact/first-contact'
import { applyPose, firstContact, meshInContactFrame } from '../contact/first-contact'
import { G, massProperties } from '../mass/mass'
import { dot } from '../math/linalg'
import type { LobeSpin, MassModel, MergedBody } from '../merge/merged'
import { mergedBody } from '../merge/merged'
import { mergeMeshes } from '../mesh/generate'
import type { Neck } from '../neck/neck'
import { neckAtDepth, neckSweep } from '../neck/neck'
import type { ContactKinematics, NoContact, RelativeOrbit } from '../orbit/kinematics'
import { contactKinematics } from '../orbit/kinematics'
import { fullShapeSpeeds, mutualPotential } from '../orbit/mutual'
import type { PathwayScreen, ScreenInput } from '../orbit/screen'
import { pathwayScreen } from '../orbit/screen'
import type { SpreadSample, SpreadSpec, SpreadSummary } from './spread'
import { createSpreadContext, runSpread } from './spread'

export const CONTACT_ALGORITHM_VERSION = 'contact-1.2.0'

export interface ContactStudyInput {
  meshA: TriMesh
  meshB: TriMesh
  /** Lobe densities, kg m⁻³. */
  densityA: number
  densityB: number
  /** B's orientation (active, B file → A axes). Default identity. */
  orientationB?: Quat
  /** Line of centres A → B (A's axes). */
  direction: Vec3
  orbit: RelativeOrbit
  orbitNormal?: Vec3
  /** Extra approach beyond first contact for the neck and merged body, m (default 0). */
  overlapDepth?: number
  massModel: MassModel
  spinA?: LobeSpin
  spinB?: LobeSpin
  observedSpinPeriod?: number
  /** Neck-sweep intervals from 0 to R_small/4 (default 4; 0 = no sweep). */
  sweepSteps?: number
  /** Heliocentric part of the screen (the rest comes from the study); omit for no screen. */
  screen?: Pick<ScreenInput, 'semiMajorAxis' | 'eccentricity' | 'inclinationDeg' | 'heliocentricSemiMajorAxis' | 'heliocentricEccentricity' | 'klPrefactor'>
  spread?: SpreadSpec
  /**
   * Mutual-potential quadrature: first order (default 3), highest order (5), target relative change
   * between successive orders (1e-4), faces per lobe above which it is simplified (1000).
   */
  mutual?: { order?: number, maxOrder?: number, tolerance?: number, maxFaces?: number }
  /** BVH cache and keys (e.g. mesh content hashes). */
  cache?: ContactBvhCache
  keyA?: string
  keyB?: string
}

/** The kinematic fields of the contact result, as `contactKinematics` defines and documents them. */
type ContactSpeeds = Pick<ContactKinematics, 'speed' | 'escapeSpeed' | 'sphereEquivalentEscapeSpeed' | 'speedRatio' | 'radialSpeed' | 'tangentialSpeed'
  | 'normalSpeed' | 'impactAngleFromNormalDeg' | 'impactAngleFromTangentDeg' | 'orbitalAngularMomentum' | 'massRatio'>

export interface ContactResult extends ContactSpeeds {
  separation: number
  point: Vec3
  normalA: Vec3
  normalB: Vec3
  poseB: Pose
  speedFullShape: number
  escapeSpeedFullShape: number
  /**
   * Quadrature report of the full-shape figures: final order, relative change from the previous
   * order (`convergence`) against `tolerance`, and the simplification (faces used vs the lobes' own).
   * The convergence covers the quadrature only; `simplified` lobes keep their mass, not their exact shape.
   */
  mutualPotential: { W: number, order: number, convergence: number | null, tolerance: number, converged: boolean, facesA: number, facesB: number, sourceFacesA: number, sourceFacesB: number, simplified: boolean }
}

export interface ContactStudyResult {
  contact: ContactResult | (NoContact & { separation: number })
  neck: Neck | null
  merged: MergedBody | null
  /**
   * Neck vs overlap depth. Each row's `tiltDeg` is 0: the sweep cuts only with planes perpendicular
   * to the line of centres (the neck at the chosen overlap also searches tilts up to 30°).
   */
  sweep: { overlapDepth: number, equivalentRadius: number, area: number, overlapVolume: number, tiltDeg: 0 }[] | null
  screen: PathwayScreen | null
  spread: (SpreadSummary & { sampleValues?: SpreadSample[] }) | null
  massModel: MassModel
  algorithmVersion: string
  /** The merged body's mesh in the contact frame (the manifold union, or both lobes at overlap 0). */
  unionMesh?: TriMesh
}

export interface StudyOptions {
  /** Progress 0..1 with a stage name. */
  onProgress?: (fraction: number, stage: string) => void
  signal?: AbortSignal
}

/**
 * Compose the full contact study. Throws GeometryError('aborted') when `signal` fires (checked
 * between stages and inside the long loops), and the stage errors otherwise.
 */
export async function runContactStudy(input: ContactStudyInput, opts: StudyOptions = {}): Promise<ContactStudyResult> {
  const report = (f: number, s: string) => opts.onProgress?.(f, s)
  const check = () => { if (opts.signal?.aborted) throw new GeometryError('aborted', 'runContactStudy: cancelled') }
  const cache = input.cache ?? new ContactBvhCache()
  const depth = input.overlapDepth ?? 0
  report(0, 'mass properties')
  const pA = massProperties(input.meshA, { density: input.densityA })
  const pB = massProperties(input.meshB, { density: input.densityB })
  check(); report(0.05, 'first contact')
  const fc = firstContact({ meshA: input.meshA, meshB: input.meshB, centroidA: pA.centroid, centroidB: pB.centroid, orientationB: input.orientationB, direction: input.direction }, { cache, keyA: input.keyA, keyB: input.keyB })
  check(); report(0.15, 'kinematics')
  const kin = contactKinematics({
    massA: pA.mass, massB: pB.mass, separation: fc.separation, direction: fc.direction, orbitNormal: input.orbitNormal, largestMomentAxisA: pA.principalAxes[2],
    contactNormal: fc.normalA, equivalentRadiusA: pA.equivalentRadius, equivalentRadiusB: pB.equivalentRadius, orbit: input.orbit,
  })
  const screen = input.screen
    ? pathwayScreen({ ...input.screen, massA: pA.mass, massB: pB.mass, J2A: pA.J2, referenceRadiusA: pA.referenceRadius, J2B: pB.J2, referenceRadiusB: pB.referenceRadius, contactSeparation: fc.separation })
    : null
  if (!kin.contact) {
    report(1, 'done')
    return { contact: kin, neck: null, merged: null, sweep: null, screen, spread: null, massModel: input.massModel, algorithmVersion: CONTACT_ALGORITHM_VERSION }
  }
  report(0.2, 'full-shape mutual potential')
  const mp = await mutualPotential(input.meshA, input.densityA, pA.centroid, input.meshB, input.densityB, fc.poseB, { ...input.mutual, signal: opts.signal })
  const fs = fullShapeSpeeds(mp.W, pA.mass, pB.mass, input.orbit, G)
  check(); report(0.4, 'neck and union')
  const smaller = Math.min(pA.equivalentRadius, pB.equivalentRadius)
  const Ac = meshInContactFrame(input.meshA, pA.centroid)
  const neckInput = { meshAContact: Ac, meshB: input.meshB, poseB: fc.poseB, direction: fc.direction, separation: fc.separation, contactPoint: fc.point, contactNormal: fc.normalA, smallerLobeRadius: smaller }
  const nk = await neckAtDepth(neckInput, depth, { signal: opts.signal })
  check(); report(0.6, 'merged body')
  const union = nk.union ?? mergeMeshes([Ac, applyPose(input.meshB, fc.poseB)])
  // The full-shape attraction along the line (force on B toward A) for the separation period.
  const fLine = -dot(mp.force, fc.direction)
  // Two-density merged body: A at ρ_A plus B∖A at ρ_B (the overlap lens counted in A).
  const merged = mergedBody({
    overlap: nk.intersection, propsA: pA, propsB: pB, poseB: nk.union ? { ...fc.poseB, translation: fc.poseB.translation.map((t, i) => t - fc.direction[i] * depth) as Vec3 } : fc.poseB,
    massModel: input.massModel, orbitalAngularMomentum: kin.orbitalAngularMomentum, orbitalAngularRate: kin.orbitalAngularRate, orbitNormal: kin.orbitNormal,
    direction: fc.direction, separation: fc.separation - depth, neckArea: nk.neck.area, spinA: input.spinA, spinB: input.spinB,
    fullShapeForce: depth === 0 ? fLine : undefined, observedSpinPeriod: input.observedSpinPeriod,
  })
  check(); report(0.7, 'neck sweep')
  const steps = input.sweepSteps ?? 4
  // Perpendicular planes only (tilt 0, stated per row): a tilt search per depth would multiply the cost.
  const sweep = steps > 0 ? (await neckSweep(neckInput, steps, smaller / 4, { tilt: false, signal: opts.signal })).map(r => ({ ...r, tiltDeg: 0 as const })) : null
  check()
  let spread: (SpreadSummary & { sampleValues?: SpreadSample[] }) | null = null
  if (input.spread) {
    report(0.85, 'spread')
    const ctx = createSpreadContext({
      meshA: input.meshA, meshB: input.meshB, orientationB: fc.poseB.quaternion, direction: fc.direction, orbit: input.orbit, orbitNormal: input.orbitNormal,
      overlapDepth: depth, massModel: input.massModel, spinA: input.spinA, spinB: input.spinB, spec: input.spread, cache,
    })
    const run = await runSpread(ctx, opts.signal, n => report(0.85 + 0.15 * n / input.spread!.samples, 'spread'))
    // Per-sample values travel with the summary, for plots and re-analysis.
    spread = { ...run.summary, sampleValues: run.samples }
  }
  report(1, 'done')
  const { contact: _c, ...k } = kin
  return {
    contact: {
      separation: fc.separation,
      point: fc.point,
      normalA: fc.normalA,
      normalB: fc.normalB,
      poseB: fc.poseB,
      speed: k.speed,
      escapeSpeed: k.escapeSpeed,
      sphereEquivalentEscapeSpeed: k.sphereEquivalentEscapeSpeed,
      speedRatio: k.speedRatio,
      radialSpeed: k.radialSpeed,
      tangentialSpeed: k.tangentialSpeed,
      normalSpeed: k.normalSpeed,
      impactAngleFromNormalDeg: k.impactAngleFromNormalDeg,
      impactAngleFromTangentDeg: k.impactAngleFromTangentDeg,
      orbitalAngularMomentum: k.orbitalAngularMomentum,
      massRatio: k.massRatio,
      speedFullShape: fs.speedFullShape,
      escapeSpeedFullShape: fs.escapeSpeedFullShape,
      mutualPotential: { W: mp.W, order: mp.order, convergence: mp.convergence, tolerance: mp.tolerance, converged: mp.converged, facesA: mp.facesA, facesB: mp.facesB, sourceFacesA: mp.sourceFacesA, sourceFacesB: mp.sourceFacesB, simplified: mp.simplified },
    },
    neck: nk.neck,
    merged,
    sweep,
    screen,
    spread,
    massModel: input.massModel,
    algorithmVersion: CONTACT_ALGORITHM_VERSION,
    unionMesh: union,
  }
}
