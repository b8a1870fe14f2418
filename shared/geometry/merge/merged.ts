/**
 * The merged body after two lobes join: mass properties of a TWO-DENSITY body (lobe A at ρ_A, the
 * part of B outside A at ρ_B), spin from the total angular momentum, breakup and separation periods
 * and a mean neck stress (docs/contact-and-kinematics.md, docs/neck-and-merged-body.md).
 *
 * Frames: contact frame (A's file axes, origin at A's centroid). Angular momenta are about the
 * system centre of mass; the merged body is assumed to spin about its own centroid, which differs
 * from the two-lobe barycentre when overlap mass is removed or redistributed (stated in `caveats`).
 */
import type { Mat3, TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import type { Pose } from '../contact/first-contact'
import type { MassProperties } from '../mass/mass'
import { G, massProperties } from '../mass/mass'
import { symmetricEigen } from '../math/eigen'
import { add, angleBetweenDeg, inverse3, matVec, norm, normalize, quatToMat3, rejectFrom, rotateTensor, scale, sub } from '../math/linalg'

/**
 * How the interpenetrated volume (the lens A∩B) is accounted. In both models the lens belongs to
 * lobe A: the merged body is A at ρ_A plus B∖A at ρ_B (its moments are those of B minus those of
 * the lens, both at ρ_B).
 * 'keep-density': densities kept, the B share of the lens is lost: Δm = ρ_B V_lens.
 * 'conserve-mass': the overlap is removed and BOTH part densities are raised by the same factor
 *   k = (m_A + m_B)/(ρ_A V_A + ρ_B (V_B − V_lens)), so the total mass is kept and the density
 *   contrast ρ_B/ρ_A is unchanged (for equal densities: ρ′ = M/V_union).
 */
export type MassModel = 'conserve-mass' | 'keep-density'

/** A lobe spin: angular velocity vector (rad/s, contact frame), 'synchronous' with the orbit, or 'none'. */
export type LobeSpin = Vec3 | 'synchronous' | 'none'

export interface MergedInput {
  /**
   * The overlap lens A∩B in the contact frame, m (closed mesh, e.g. `neckAtDepth(...).intersection`);
   * null or an empty mesh when the lobes only touch (overlapDepth 0).
   */
  overlap: TriMesh | null
  /** Lobe mass properties in their own file frames (at their own densities). */
  propsA: MassProperties
  propsB: MassProperties
  /**
   * B's pose in the contact frame, x = R x_B,file + t, INCLUDING the extra overlap move: B's
   * centroid sits at R c_B + t and its inertia is rotated by R. A's centroid is the origin.
   */
  poseB: Pose
  massModel: MassModel
  /** Orbital angular momentum at contact, kg m² s⁻¹, and the line's angular rate (rad/s) about orbitNormal. */
  orbitalAngularMomentum: Vec3
  orbitalAngularRate: number
  orbitNormal: Vec3
  /** Unit line of centres and centroid separation in the merged body (d − overlapDepth), m. */
  direction: Vec3
  separation: number
  /** Neck area, m² (0 → neckStress null). */
  neckArea: number
  /** Lobe spins (default 'synchronous' for both). */
  spinA?: LobeSpin
  spinB?: LobeSpin
  /** Full-shape mutual attraction along the line at this separation, N (from mutual.ts), optional. */
  fullShapeForce?: number
  /** An observed spin period, s, for the minimum-density inverse (optional). */
  observedSpinPeriod?: number
}

export interface MergedBody {
  massModel: MassModel
  /** Union volume V_A + V_B − V_lens, m³; mass, kg; bulk density M/V, kg m⁻³. */
  volume: number
  mass: number
  density: number
  /** Densities of the two parts, kg m⁻³: A (with the lens) and B∖A (raised by the same factor for 'conserve-mass'). */
  densityA: number
  densityB: number
  /** Overlap (lens) volume, m³ (0 when the lobes only touch). */
  overlapVolume: number
  /** Mass lost with the overlap ('keep-density': ρ_B V_lens), kg (0 for 'conserve-mass'). */
  massLost: number
  /** Centre of mass, m, contact frame. */
  centroid: Vec3
  /** About the centroid, contact axes, kg m². */
  inertia: Mat3
  principalMoments: Vec3
  principalAxes: Mat3
  J2: number
  C22: number
  referenceRadius: number
  deeveSemiAxes: Vec3
  /** Total angular momentum (orbit + lobe spins), kg m² s⁻¹, contact frame. */
  angularMomentum: Vec3
  /** ω = I⁻¹L, rad/s, its period 2π/|ω| (s) and unit axis; null when the body does not spin (L = 0). */
  angularVelocity: Vec3
  spinPeriod: number | null
  spinAxis: Vec3 | null
  /** 2πC/|L| — the period after relaxing to spin about the largest-moment axis, s (null: no spin). */
  relaxedSpinPeriod: number | null
  /** Angle between L and the largest-moment axis, deg (0–90); null when L = 0. */
  tumbleAngleDeg: number | null
  /** √(3π/(Gρ)) at the merged bulk density, s. */
  breakupSpinPeriod: number
  /**
   * d used by the separation periods and the neck stress: the lobe-centroid separation after the
   * settling move (first-contact separation − overlap depth), m.
   */
  separation: number
  /** 2π√(d³/(GM)) (lobes as point masses), s, and with the full-shape attraction when given. */
  separationSpinPeriod: number
  separationSpinPeriodFullShape: number | null
  /** Densities that keep the lobes together at `observedSpinPeriod` (point-mass lobes, equal densities) and a strengthless sphere, kg m⁻³. */
  minimumDensityForObservedPeriod: { lobes: number, sphere: number } | null
  /**
   * Mean neck stress σ̄ = F_n/A_n, Pa (tension > 0); null when the neck area is 0. The two sides are
   * the parts A (with the lens) and B∖A as point masses at their centroids.
   */
  neckStress: number | null
  neckStressCaveats: string
  caveats: string
}

const NECK_CAVEATS = 'Mean free-body estimate F_n = m_B(ω⊥² r_B − G m_A/d²) over the neck area, with A (the overlap '
  + 'counted in A) and the rest of B as point masses at their centroids, d their separation: each part homogeneous, no stress concentration, no shear; order of magnitude only (fuller analyses use '
  + 'finite-element or limit analysis).'

/** Minimum density keeping two point-mass lobes of total volume V together at period P: ρ = (2π/P)² d³/(G V). */
export function minimumDensityForPeriod(periodS: number, separation: number, totalLobeVolume: number): number {
  return (2 * Math.PI / periodS) ** 2 * separation ** 3 / (G * totalLobeVolume)
}

/** Strengthless-sphere breakup period √(3π/(Gρ)), s. */
export function breakupSpinPeriod(density: number): number {
  return Math.sqrt(3 * Math.PI / (G * density))
}

function lobeOmega(spin: LobeSpin | undefined, input: MergedInput): Vec3 {
  const s = spin ?? 'synchronous'
  if (s === 'none') return [0, 0, 0]
  if (s === 'synchronous') return scale(normalize(input.orbitNormal), input.orbitalAngularRate)
  return s
}

/** A body part: mass (kg, may be negative for a removed piece), centroid (m) and inertia about it (kg m²), contact axes. */
interface Part { mass: number, centroid: Vec3, inertia: Mat3 }

/**
 * Mass, centre of mass and inertia about it of a sum of parts, by the parallel-axis (Steiner)
 * theorem: I = Σ [I_i + m_i(|r_i|²E − r_i r_iᵀ)], r_i = c_i − c (Goldstein, Classical Mechanics, ch. 5 [mem: chapter]).
 * A negative mass subtracts a piece.
 */
export function combineParts(parts: Part[]): Part {
  let mass = 0
  let c: Vec3 = [0, 0, 0]
  for (const p of parts) { mass += p.mass; c = add(c, scale(p.centroid, p.mass)) }
  c = scale(c, 1 / mass)
  const I: Mat3 = [[0, 0, 0], [0, 0, 0], [0, 0, 0]]
  for (const p of parts) {
    const r = sub(p.centroid, c)
    const r2 = r[0] * r[0] + r[1] * r[1] + r[2] * r[2]
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) I[i][j] += p.inertia[i][j] + p.mass * ((i === j ? r2 : 0) - r[i] * r[j])
    }
  }
  return { mass, centroid: c, inertia: I }
}

/**
 * Mass properties, spin state, breakup figures and neck stress of the merged body: lobe A at ρ_A
 * plus B∖A at ρ_B (the lens counted in A), both scaled by one factor for 'conserve-mass'.
 * @throws GeometryError('bad-input') for a bad mass model or an overlap not smaller than B;
 *   mass.ts errors for a bad overlap mesh.
 */
export function mergedBody(input: MergedInput): MergedBody {
  const { propsA, propsB } = input
  if (input.massModel !== 'conserve-mass' && input.massModel !== 'keep-density') throw new GeometryError('bad-input', 'mergedBody: massModel must be conserve-mass or keep-density', [{ path: 'massModel', message: 'unknown mass model' }])
  const RB = quatToMat3(input.poseB.quaternion)
  const IA = propsA.inertia
  const IB = rotateTensor(RB, propsB.inertia)
  const cB = add(matVec(RB, propsB.centroid), input.poseB.translation)
  // The lens at ρ_B, to be taken out of B (it belongs to A).
  const lens = input.overlap && input.overlap.indices.length > 0 ? massProperties(input.overlap, { density: propsB.density }) : null
  const VL = lens ? lens.volume : 0
  if (VL >= propsB.volume || VL >= propsA.volume) throw new GeometryError('bad-input', 'mergedBody: the overlap is not smaller than both lobes', [{ path: 'overlap', message: 'overlap volume ≥ a lobe volume' }])
  const partA: Part = { mass: propsA.mass, centroid: [0, 0, 0], inertia: IA }
  const partB = combineParts(lens ? [{ mass: propsB.mass, centroid: cB, inertia: IB }, { mass: -lens.mass, centroid: lens.centroid, inertia: lens.inertia.map(r => r.map(v => -v)) as Mat3 }] : [{ mass: propsB.mass, centroid: cB, inertia: IB }])
  const mLobes = propsA.mass + propsB.mass
  const kept = partA.mass + partB.mass
  // One factor for both parts keeps the centroid and the density contrast; it scales mass and inertia.
  const k = input.massModel === 'conserve-mass' ? mLobes / kept : 1
  const body = combineParts([partA, partB])
  const M = body.mass * k
  const inertia = body.inertia.map(r => r.map(v => v * k)) as Mat3
  const volume = propsA.volume + propsB.volume - VL
  const eig = symmetricEigen(inertia)
  const [A, B, Cm] = eig.values
  const R = Math.cbrt(3 * volume / (4 * Math.PI))
  const semi = (x: number) => Math.sqrt(Math.max(0, 5 * x / (2 * M)))
  const ell: Vec3 = [semi(B + Cm - A), semi(A + Cm - B), semi(A + B - Cm)]
  const ks = Math.cbrt(volume / (4 / 3 * Math.PI * ell[0] * ell[1] * ell[2]))
  const L = add(add(input.orbitalAngularMomentum, matVec(IA, lobeOmega(input.spinA, input))), matVec(IB, lobeOmega(input.spinB, input)))
  const omega = matVec(inverse3(inertia), L)
  const wMag = norm(omega)
  const Lmag = norm(L)
  const cAxis = eig.vectors[2]
  const d = input.separation
  const sep = 2 * Math.PI * Math.sqrt(d ** 3 / (G * mLobes))
  // No spin at all (e.g. a head-on approach with non-spinning lobes): |L| at round-off level of
  // the body's angular-momentum scale C·(2π/P_sep). Periods and the tumble angle are then undefined.
  const spinning = Lmag > 1e-9 * Cm * (2 * Math.PI / sep) && wMag > 0
  const tumble = spinning ? angleBetweenDeg(L, cAxis) : null
  const mu = propsA.mass * propsB.mass / mLobes
  const sepFull = input.fullShapeForce && input.fullShapeForce > 0 ? 2 * Math.PI / Math.sqrt(input.fullShapeForce / (mu * d)) : null
  let neckStress: number | null = null
  if (input.neckArea > 0) {
    // The two sides of the neck: A (with the lens) and B∖A, as point masses at their centroids.
    const mA = partA.mass * k, mB = partB.mass * k
    const line = sub(partB.centroid, partA.centroid)
    const dp = norm(line)
    const wPerp = norm(rejectFrom(omega, normalize(line)))
    const rB = dp * mA / (mA + mB)
    const Fn = mB * (wPerp * wPerp * rB - G * mA / (dp * dp))
    neckStress = Fn / input.neckArea
  }
  const twoDensity = propsA.density !== propsB.density
  return {
    massModel: input.massModel,
    volume,
    mass: M,
    density: M / volume,
    densityA: propsA.density * k,
    densityB: propsB.density * k,
    overlapVolume: VL,
    massLost: input.massModel === 'conserve-mass' ? 0 : mLobes - M,
    centroid: body.centroid,
    inertia,
    principalMoments: [A, B, Cm],
    principalAxes: eig.vectors,
    J2: (2 * Cm - A - B) / (2 * M * R * R),
    C22: (B - A) / (4 * M * R * R),
    referenceRadius: R,
    deeveSemiAxes: [ell[0] * ks, ell[1] * ks, ell[2] * ks],
    angularMomentum: L,
    angularVelocity: omega,
    spinPeriod: spinning ? 2 * Math.PI / wMag : null,
    spinAxis: spinning ? scale(omega, 1 / wMag) : null,
    relaxedSpinPeriod: spinning ? 2 * Math.PI * Cm / Lmag : null,
    tumbleAngleDeg: tumble === null ? null : Math.min(tumble, 180 - tumble),
    breakupSpinPeriod: breakupSpinPeriod(M / volume),
    separation: d,
    separationSpinPeriod: sep,
    separationSpinPeriodFullShape: sepFull,
    minimumDensityForObservedPeriod: input.observedSpinPeriod
      ? { lobes: minimumDensityForPeriod(input.observedSpinPeriod, d, propsA.volume + propsB.volume), sphere: 3 * Math.PI / (G * input.observedSpinPeriod ** 2) }
      : null,
    neckStress,
    neckStressCaveats: NECK_CAVEATS,
    caveats: (twoDensity ? 'Two-density body: lobe A at densityA, the part of B outside A at densityB' : 'Homogeneous body')
      + ' (the overlap counted in A; ' + (input.massModel === 'conserve-mass' ? 'overlap removed, both densities raised by one factor to keep the total mass' : 'densities kept, overlap mass of B lost')
      + '); each part homogeneous; J2 and C22 about the volume-equivalent radius of the union; the breakup period uses the bulk density; angular momentum about the two-lobe barycentre, spin about the merged centroid; no energy dissipation or mass loss modelled.',
  }
}
