/**
 * The merged body after two lobes join: mass properties of the union (mass.ts), spin from the
 * total angular momentum, breakup and separation periods and a mean neck stress (SCIENCE.md §5–6).
 *
 * Frames: contact frame (A's file axes, origin at A's centroid). Angular momenta are about the
 * system centre of mass; the merged body is assumed to spin about its own centroid, which for the
 * homogeneous union differs slightly from the two-lobe barycentre (stated in `caveats`).
 */
import type { Mat3, TriMesh, Vec3 } from './types'
import { GeometryError } from './types'
import { G, massProperties } from './mass'
import type { MassProperties } from './mass'
import { add, angleBetweenDeg, inverse3, matVec, norm, normalize, quatToMat3, rejectFrom, rotateTensor, scale } from './quat'
import type { Pose } from './contact'

/**
 * 'conserve-mass': the overlap is removed and the union's density raised, ρ′ = (m_A + m_B)/V_union.
 * 'keep-density': the overlap mass is lost; the union is homogeneous at the volume-weighted lobe
 * density ρ̄ = (ρ_A V_A + ρ_B V_B)/(V_A + V_B) (= ρ when the lobes share a density), mass ρ̄ V_union.
 */
export type MassModel = 'conserve-mass' | 'keep-density'

/** A lobe spin: angular velocity vector (rad/s, contact frame), 'synchronous' with the orbit, or 'none'. */
export type LobeSpin = Vec3 | 'synchronous' | 'none'

export interface MergedInput {
  /** Union mesh in the contact frame (for overlapDepth 0: the two touching lobes as one mesh). */
  union: TriMesh
  /** Lobe mass properties in their own file frames (at their own densities). */
  propsA: MassProperties
  propsB: MassProperties
  /** B's pose in the contact frame (its inertia is rotated by it). */
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
  /** m³, kg, kg m⁻³. */
  volume: number
  mass: number
  density: number
  /** Mass lost with the overlap ('keep-density'), kg (0 for 'conserve-mass'). */
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
  /** 2π√(d³/(GM)) (lobes as point masses), s, and with the full-shape attraction when given. */
  separationSpinPeriod: number
  separationSpinPeriodFullShape: number | null
  /** Densities that keep the lobes together at `observedSpinPeriod` (point-mass lobes, equal densities) and a strengthless sphere, kg m⁻³. */
  minimumDensityForObservedPeriod: { lobes: number, sphere: number } | null
  /** Mean neck stress σ̄ = F_n/A_n, Pa (tension > 0); null when the neck area is 0. */
  neckStress: number | null
  neckStressCaveats: string
  caveats: string
}

const NECK_CAVEATS = 'Mean free-body estimate F_n = m_B(ω⊥² r_B − G m_A/d²) over the neck area: point-mass '
  + 'lobes, homogeneous, no stress concentration, no shear; order of magnitude only (fuller analyses use '
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

/**
 * Mass properties, spin state, breakup figures and neck stress of the merged body.
 * @throws GeometryError('BAD_INPUT') for a bad mass model; mass.ts errors for a bad union mesh.
 */
export function mergedBody(input: MergedInput): MergedBody {
  const { propsA, propsB } = input
  if (input.massModel !== 'conserve-mass' && input.massModel !== 'keep-density') throw new GeometryError('BAD_INPUT', 'mergedBody: massModel must be conserve-mass or keep-density', [{ path: 'massModel', message: 'unknown mass model' }])
  const unit = massProperties(input.union, { density: 1 })
  const Vu = unit.volume
  const mLobes = propsA.mass + propsB.mass
  const rhoMean = (propsA.density * propsA.volume + propsB.density * propsB.volume) / (propsA.volume + propsB.volume)
  const rho = input.massModel === 'conserve-mass' ? mLobes / Vu : rhoMean
  const P = massProperties(input.union, { density: rho })
  const RB = quatToMat3(input.poseB.quaternion)
  const IA = propsA.inertia
  const IB = rotateTensor(RB, propsB.inertia)
  const L = add(add(input.orbitalAngularMomentum, matVec(IA, lobeOmega(input.spinA, input))), matVec(IB, lobeOmega(input.spinB, input)))
  const omega = matVec(inverse3(P.inertia), L)
  const wMag = norm(omega)
  const Lmag = norm(L)
  const cAxis = P.principalAxes[2]
  const d = input.separation
  const M = P.mass
  const sep = 2 * Math.PI * Math.sqrt(d ** 3 / (G * mLobes))
  // No spin at all (e.g. a head-on approach with non-spinning lobes): |L| at round-off level of
  // the body's angular-momentum scale C·(2π/P_sep). Periods and the tumble angle are then undefined.
  const spinning = Lmag > 1e-9 * P.principalMoments[2] * (2 * Math.PI / sep) && wMag > 0
  const tumble = spinning ? angleBetweenDeg(L, cAxis) : null
  const mu = propsA.mass * propsB.mass / mLobes
  const sepFull = input.fullShapeForce && input.fullShapeForce > 0 ? 2 * Math.PI / Math.sqrt(input.fullShapeForce / (mu * d)) : null
  let neckStress: number | null = null
  if (input.neckArea > 0) {
    const wPerp = norm(rejectFrom(omega, normalize(input.direction)))
    const rB = d * propsA.mass / mLobes
    const Fn = propsB.mass * (wPerp * wPerp * rB - G * propsA.mass / (d * d))
    neckStress = Fn / input.neckArea
  }
  return {
    massModel: input.massModel,
    volume: P.volume,
    mass: M,
    density: rho,
    massLost: input.massModel === 'conserve-mass' ? 0 : mLobes - M,
    centroid: P.centroid,
    inertia: P.inertia,
    principalMoments: P.principalMoments,
    principalAxes: P.principalAxes,
    J2: P.J2,
    C22: P.C22,
    referenceRadius: P.referenceRadius,
    deeveSemiAxes: P.deeveSemiAxes,
    angularMomentum: L,
    angularVelocity: omega,
    spinPeriod: spinning ? 2 * Math.PI / wMag : null,
    spinAxis: spinning ? scale(omega, 1 / wMag) : null,
    relaxedSpinPeriod: spinning ? 2 * Math.PI * P.principalMoments[2] / Lmag : null,
    tumbleAngleDeg: tumble === null ? null : Math.min(tumble, 180 - tumble),
    breakupSpinPeriod: breakupSpinPeriod(M / P.volume),
    separationSpinPeriod: sep,
    separationSpinPeriodFullShape: sepFull,
    minimumDensityForObservedPeriod: input.observedSpinPeriod
      ? { lobes: minimumDensityForPeriod(input.observedSpinPeriod, d, propsA.volume + propsB.volume), sphere: 3 * Math.PI / (G * input.observedSpinPeriod ** 2) }
      : null,
    neckStress,
    neckStressCaveats: NECK_CAVEATS,
    caveats: 'Homogeneous union (' + (input.massModel === 'conserve-mass' ? 'overlap removed, density raised to keep the mass' : 'overlap mass lost, volume-weighted density')
      + '); angular momentum about the two-lobe barycentre, spin about the union centroid; no energy dissipation or mass loss modelled.',
  }
}
