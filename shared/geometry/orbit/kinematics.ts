/**
 * Two-body kinematics of two lobes at first contact (docs/contact-and-kinematics.md).
 *
 * The lobes are treated as two point masses at centroid separation d (from `firstContact`) on a
 * Keplerian relative orbit: the path before contact is NOT integrated, there is no full-shape
 * gravity or tidal torque on the approach, and the orbit elements are those of the relative
 * motion of B about A. Contact frame: A's file axes, origin at A's centroid; `direction` points
 * from A's centroid toward B's.
 */
import type { Vec3 } from '../types'
import { GeometryError } from '../types'
import { G } from '../mass/mass'
import { add, angleBetweenDeg, anyPerpendicular, cross, dot, norm, normalize, rejectFrom, scale } from '../math/linalg'

/** Relative orbit of B about A before contact. Pericentre default 0 (head-on). */
export type RelativeOrbit
  = | { kind: 'bound', semiMajorAxis: number, eccentricity: number }
    | { kind: 'parabolic', pericentre?: number }
    | { kind: 'hyperbolic', vInfinity: number, pericentre?: number }

export interface KinematicsInput {
  /** Lobe masses, kg. */
  massA: number
  massB: number
  /** Centroid separation at first contact, m. */
  separation: number
  /** Unit line of centres, A → B, contact frame. */
  direction: Vec3
  /** Unit orbit normal (made ⊥ to `direction`). Default: `largestMomentAxisA` made ⊥ to direction. */
  orbitNormal?: Vec3
  /** A's largest-moment principal axis (contact frame) for the default orbit normal. */
  largestMomentAxisA?: Vec3
  /** Unit contact normal (outward of A) for normalSpeed and the impact angles. Default `direction`. */
  contactNormal?: Vec3
  /** Volume-equivalent radii of the lobes, m, for sphereEquivalentEscapeSpeed. */
  equivalentRadiusA: number
  equivalentRadiusB: number
  orbit: RelativeOrbit
}

export interface ContactKinematics {
  contact: true
  /** Relative speed at contact (vis-viva), m/s. */
  speed: number
  /** Mutual escape speed √(2GM/d), m/s. */
  escapeSpeed: number
  /** √(2GM/(R1+R2)) with volume-equivalent radii, m/s. */
  sphereEquivalentEscapeSpeed: number
  /** speed / escapeSpeed. */
  speedRatio: number
  /** Closing speed along the line of centres, m/s (≥ 0). */
  radialSpeed: number
  /** Speed ⊥ line of centres, h/d, m/s. */
  tangentialSpeed: number
  /** |v·n| along the contact normal, m/s. */
  normalSpeed: number
  /** Angle between the approach velocity and the contact normal, deg (0 head-on; Marohnic et al. 2021 convention). */
  impactAngleFromNormalDeg: number
  /** Angle between the approach velocity and the tangent plane, deg (90 head-on; Jutzi & Asphaug 2015 convention). */
  impactAngleFromTangentDeg: number
  /** Same as impactAngleFromNormalDeg but measured from the line of centres, deg. */
  impactAngleFromLineOfCentresDeg: number
  /** μ r × v, kg m² s⁻¹, contact frame (about the system centre of mass). */
  orbitalAngularMomentum: Vec3
  /** smaller / larger mass. */
  massRatio: number
  /** Velocity of B relative to A at contact, m/s, contact frame. */
  relativeVelocity: Vec3
  /** Unit orbit normal used. */
  orbitNormal: Vec3
  /** Specific relative angular momentum h, m² s⁻¹, and reduced mass μ, kg. */
  specificAngularMomentum: number
  reducedMass: number
  pericentre: number
  /** Instantaneous angular rate of the line of centres at contact, rad/s (h/d²). */
  orbitalAngularRate: number
}

export interface NoContact {
  contact: false
  reason: string
  /** Pericentre of the relative orbit, m. */
  pericentre: number
  /** Separation at first touch, m. */
  separation: number
  /** Apocentre (bound orbits), m. */
  apocentre?: number
}

function positive(name: string, v: number): void {
  if (!(v > 0) || !Number.isFinite(v)) throw new GeometryError('bad-input', `contactKinematics: ${name} must be positive and finite`, [{ path: name, message: 'must be positive' }])
}

/**
 * Speeds, angles and angular momentum at first contact from the relative Keplerian orbit.
 * Contact exists iff pericentre q ≤ d (and d ≤ apocentre for bound orbits), both within a relative
 * 1e-6 (a = d, e = 0 is grazing contact from a circular orbit); otherwise `{ contact: false }`.
 * v_r² is clamped at 0 (grazing). B approaches A (radial velocity inward).
 * @throws GeometryError('bad-input') for non-positive masses, separation or radii, e outside [0,1).
 */
export function contactKinematics(input: KinematicsInput): ContactKinematics | NoContact {
  const { massA, massB, separation: d, orbit } = input
  positive('massA', massA); positive('massB', massB); positive('separation', d)
  positive('equivalentRadiusA', input.equivalentRadiusA); positive('equivalentRadiusB', input.equivalentRadiusB)
  const u = normalize(input.direction, 'contactKinematics: direction')
  const M = massA + massB
  const mu = massA * massB / M
  const GM = G * M
  const tol = 1e-6
  let v2: number, h: number, q: number
  if (orbit.kind === 'bound') {
    const { semiMajorAxis: a, eccentricity: e } = orbit
    positive('orbit.semiMajorAxis', a)
    if (!(e >= 0 && e < 1)) throw new GeometryError('bad-input', 'contactKinematics: bound orbit eccentricity must be in [0, 1)', [{ path: 'orbit.eccentricity', message: 'must be in [0, 1)' }])
    q = a * (1 - e)
    const Q = a * (1 + e)
    if (q > d * (1 + tol)) return { contact: false, reason: 'pericentre beyond the contact separation: the lobes never touch', pericentre: q, separation: d, apocentre: Q }
    if (Q < d * (1 - tol)) return { contact: false, reason: 'apocentre inside the contact separation: the lobes overlap on this orbit', pericentre: q, separation: d, apocentre: Q }
    v2 = GM * (2 / d - 1 / a)
    h = Math.sqrt(GM * a * (1 - e * e))
  }
  else if (orbit.kind === 'parabolic') {
    q = orbit.pericentre ?? 0
    if (!(q >= 0)) throw new GeometryError('bad-input', 'contactKinematics: pericentre must be ≥ 0', [{ path: 'orbit.pericentre', message: 'must be ≥ 0' }])
    if (q > d * (1 + tol)) return { contact: false, reason: 'pericentre beyond the contact separation: the lobes never touch', pericentre: q, separation: d }
    v2 = 2 * GM / d
    h = Math.sqrt(2 * GM * q)
  }
  else {
    q = orbit.pericentre ?? 0
    positive('orbit.vInfinity', orbit.vInfinity)
    if (!(q >= 0)) throw new GeometryError('bad-input', 'contactKinematics: pericentre must be ≥ 0', [{ path: 'orbit.pericentre', message: 'must be ≥ 0' }])
    if (q > d * (1 + tol)) return { contact: false, reason: 'pericentre beyond the contact separation: the lobes never touch', pericentre: q, separation: d }
    v2 = orbit.vInfinity ** 2 + 2 * GM / d
    h = q * Math.sqrt(orbit.vInfinity ** 2 + 2 * GM / q || 0)
    if (q === 0) h = 0
  }
  const speed = Math.sqrt(Math.max(v2, 0))
  const vt = Math.min(h / d, speed)
  const vr = Math.sqrt(Math.max(speed * speed - vt * vt, 0))
  // Orbit normal ⊥ direction.
  let n: Vec3
  const seed = input.orbitNormal ?? input.largestMomentAxisA
  if (seed && norm(rejectFrom(seed, u)) > 1e-9 * norm(seed)) n = normalize(rejectFrom(seed, u))
  else n = anyPerpendicular(u)
  const tHat = cross(n, u) // prograde about n
  const v: Vec3 = add(scale(u, -vr), scale(tHat, vt))
  const nc = input.contactNormal ? normalize(input.contactNormal, 'contactKinematics: contactNormal') : u
  const approach = scale(v, -1) // A seen from B moves along −v; angle measured against the normal pointing into A from B
  const fromNormal = speed > 0 ? angleBetweenDeg(approach, nc) : 0
  const fromNormalAcute = Math.min(fromNormal, 180 - fromNormal)
  const fromLine = speed > 0 ? angleBetweenDeg(approach, u) : 0
  const escapeSpeed = Math.sqrt(2 * GM / d)
  return {
    contact: true,
    speed,
    escapeSpeed,
    sphereEquivalentEscapeSpeed: Math.sqrt(2 * GM / (input.equivalentRadiusA + input.equivalentRadiusB)),
    speedRatio: speed / escapeSpeed,
    radialSpeed: vr,
    tangentialSpeed: vt,
    normalSpeed: Math.abs(dot(v, nc)),
    impactAngleFromNormalDeg: fromNormalAcute,
    impactAngleFromTangentDeg: 90 - fromNormalAcute,
    impactAngleFromLineOfCentresDeg: Math.min(fromLine, 180 - fromLine),
    orbitalAngularMomentum: scale(cross(scale(u, d), v), mu),
    massRatio: Math.min(massA, massB) / Math.max(massA, massB),
    relativeVelocity: v,
    orbitNormal: n,
    specificAngularMomentum: d * vt,
    reducedMass: mu,
    pericentre: q,
    orbitalAngularRate: vt / d,
  }
}
