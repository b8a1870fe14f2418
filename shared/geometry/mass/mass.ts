/**
 * Mass properties of a closed, consistently oriented (outward, CCW) triangle mesh of constant
 * density, by signed tetrahedra (docs/mass-properties.md; Mirtich 1996, Kallay 2006). SI units throughout:
 * positions in metres, density kg m⁻³. Accumulation is in float64 relative to the bounding-box
 * centre (subtracted first) to limit cancellation on large coordinates.
 *
 * Frames: "file" = the axes and origin of the input coordinates; "principal" = origin at the
 * centroid, axes = rows of `rotationToPrincipal` (x along the smallest moment A, z along C).
 */
import type { Mat3, TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import type { Harmonics } from './harmonics'
import { harmonicIntegralsFromMoments, harmonicsFromIntegrals, rescaleHarmonics } from './harmonics'
import { polyhedronMoments } from './moments'
import { symmetricEigen } from '../math/eigen'
import { vertexBounds } from '../mesh/bounds'
import { faceComponents } from '../mesh/components'

/** Newtonian constant of gravitation, m³ kg⁻¹ s⁻² (CODATA 2018). */
export const G = 6.67430e-11

export interface ComponentMass { volume: number, mass: number, centroid: Vec3, faceCount: number }

export interface MassProperties {
  /** kg m⁻³ */
  density: number
  /** m³ */
  volume: number
  /** m² */
  surfaceArea: number
  /** kg */
  mass: number
  /** Centre of mass, m, file frame. */
  centroid: Vec3
  /** Inertia tensor about the centroid, kg m², file axes; I = tr(C)E − C, off-diagonals = −products of inertia. */
  inertia: Mat3
  /** [A, B, C] ascending, kg m². */
  principalMoments: Vec3
  /** Unit rows in A ≤ B ≤ C order, right-handed, file-frame components. */
  principalAxes: Mat3
  /** Radius of the sphere of equal volume, m. */
  equivalentRadius: number
  /** Semi-axes (a ≥ b ≥ c), m, of the homogeneous ellipsoid with the same mass and principal moments. */
  ellipsoidSemiAxes: Vec3
  /** Dynamically equivalent equal-volume ellipsoid (DEEVE): moment-matched axes scaled to the body's volume, m. */
  deeveSemiAxes: Vec3
  /** Reference radius R of all coefficients, m (default equivalentRadius). */
  referenceRadius: number
  /** J2 = −C20 in the principal frame (density independent). */
  J2: number
  /** C22 in the principal frame (≥ 0). */
  C22: number
  /** 4π-normalised: −J2/√5. */
  C20Normalized: number
  /** 4π-normalised: C22/√(5/12). */
  C22Normalized: number
  /** Unnormalised degree-2 coefficients in the FILE frame about the centroid (MacCullagh). */
  degree2: { C20: number, C21: number, S21: number, C22: number, S22: number }
  /** Rows = principal axes; maps file-frame vectors (relative to the centroid) to the principal frame. */
  rotationToPrincipal: Mat3
  /** Degree ≤ 4 coefficients in the principal frame about the centroid. */
  harmonics: Harmonics
  /** File frame, m. */
  boundingBox: { min: Vec3, max: Vec3 }
  /** Distance from the centroid to the farthest vertex, m. */
  maxRadius: number
  /**
   * Point-mass escape speed from the farthest surface point, √(2GM/maxRadius), m s⁻¹. A rough
   * figure: it ignores the shape and the spin (see `surfaceEscapeSpeed` for the polyhedral value).
   */
  escapeSpeedPointMass: number
  /** Per connected component (present only when there is more than one). */
  components?: ComponentMass[]
  /** G used, m³ kg⁻¹ s⁻². */
  G: number
}

/**
 * Mass properties under a constant density. The mesh must be closed and outward-oriented (run
 * `validateMesh` first); a negative total volume throws 'inside-out'.
 * @param opts.density kg m⁻³ (> 0)
 * @param opts.referenceRadius m, for J2, C22 and the harmonics (default: equivalentRadius)
 * @param opts.components optional: the components `validateMesh` found for this very mesh
 *   (`{ label: componentLabels, count: report.components }`, the labels `faceComponents` gives),
 *   so they are not searched again; one component skips the per-component pass.
 * @throws GeometryError 'bad-argument', 'empty-mesh', 'inside-out'
 */
export function massProperties(mesh: TriMesh, opts: { density: number, referenceRadius?: number, components?: { label: Uint32Array, count: number } }): MassProperties {
  const rho = opts.density
  if (!(rho > 0) || !Number.isFinite(rho)) throw new GeometryError('bad-argument', `massProperties: density must be a positive finite number (kg m^-3), got ${rho}`)
  if (opts.referenceRadius !== undefined && !(opts.referenceRadius > 0 && Number.isFinite(opts.referenceRadius))) throw new GeometryError('bad-argument', 'massProperties: referenceRadius must be positive')
  const P = mesh.positions
  const I = mesh.indices
  const nv = P.length / 3
  if (nv === 0 || I.length === 0) throw new GeometryError('empty-mesh', 'massProperties: the mesh has no faces')
  const { box } = vertexBounds(P)
  const minx = box[0]!, miny = box[1]!, minz = box[2]!, maxx = box[3]!, maxy = box[4]!, maxz = box[5]!
  const ox = (minx + maxx) / 2, oy = (miny + maxy) / 2, oz = (minz + maxz) / 2
  // monomial moments about o, degree 0..4 (MOMENT_MONOMIALS order: 1; x y z; xx xy xz yy yz zz; ...)
  const { moments, surfaceArea } = polyhedronMoments(mesh, [ox, oy, oz])
  const volume = moments[0]!
  if (!(volume > 0)) throw new GeometryError('inside-out', `massProperties: the signed volume is ${volume <= 0 ? 'not positive' : 'not finite'} (${volume}); the mesh is inside-out or not closed (run validateMesh first)`)
  const gx = moments[1]! / volume, gy = moments[2]! / volume, gz = moments[3]! / volume
  // second moment about the centroid, per unit density: C_cm = C_o − V g gᵀ
  const Cxx = moments[4]! - volume * gx * gx, Cxy = moments[5]! - volume * gx * gy, Cxz = moments[6]! - volume * gx * gz
  const Cyy = moments[7]! - volume * gy * gy, Cyz = moments[8]! - volume * gy * gz, Czz = moments[9]! - volume * gz * gz
  const tr = Cxx + Cyy + Czz
  const mass = rho * volume
  const inertia: Mat3 = [
    [rho * (tr - Cxx), -rho * Cxy, -rho * Cxz],
    [-rho * Cxy, rho * (tr - Cyy), -rho * Cyz],
    [-rho * Cxz, -rho * Cyz, rho * (tr - Czz)],
  ]
  const centroid: Vec3 = [ox + gx, oy + gy, oz + gz]
  const eig = symmetricEigen(inertia)
  const [A, B, Cm] = eig.values
  const axes = eig.vectors
  const equivalentRadius = Math.cbrt((3 * volume) / (4 * Math.PI))
  const R = opts.referenceRadius ?? equivalentRadius
  const semi = (x: number) => Math.sqrt(Math.max(0, (5 * x) / (2 * mass)))
  const ellipsoidSemiAxes: Vec3 = [semi(B + Cm - A), semi(A + Cm - B), semi(A + B - Cm)]
  const ellVol = (4 / 3) * Math.PI * ellipsoidSemiAxes[0] * ellipsoidSemiAxes[1] * ellipsoidSemiAxes[2]
  const ks = ellVol > 0 ? Math.cbrt(volume / ellVol) : Number.NaN
  const deeveSemiAxes: Vec3 = [ellipsoidSemiAxes[0] * ks, ellipsoidSemiAxes[1] * ks, ellipsoidSemiAxes[2] * ks]
  const MR2 = mass * R * R
  const J2 = (2 * Cm - A - B) / (2 * MR2)
  const C22 = (B - A) / (4 * MR2)
  const [Ixx, Iyy, Izz] = [inertia[0][0], inertia[1][1], inertia[2][2]]
  const degree2 = {
    C20: (Ixx + Iyy - 2 * Izz) / (2 * MR2),
    C21: -inertia[0][2] / MR2,
    S21: -inertia[1][2] / MR2,
    C22: (Iyy - Ixx) / (4 * MR2),
    S22: -inertia[0][1] / (2 * MR2),
  }
  const ints = harmonicIntegralsFromMoments(moments, [gx, gy, gz], axes)
  const harmonics = harmonicsFromIntegrals(ints, volume, R, 'principal')
  const maxR2 = farthestSquared(P, centroid)
  const maxRadius = Math.sqrt(maxR2)
  const props: MassProperties = {
    density: rho,
    volume,
    surfaceArea,
    mass,
    centroid,
    inertia,
    principalMoments: [A, B, Cm],
    principalAxes: axes,
    equivalentRadius,
    ellipsoidSemiAxes,
    deeveSemiAxes,
    referenceRadius: R,
    J2,
    C22,
    C20Normalized: -J2 / Math.sqrt(5),
    C22Normalized: C22 / Math.sqrt(5 / 12),
    degree2,
    rotationToPrincipal: axes.map(r => [...r]) as Mat3,
    harmonics,
    boundingBox: { min: [minx, miny, minz], max: [maxx, maxy, maxz] },
    maxRadius,
    escapeSpeedPointMass: Math.sqrt((2 * G * mass) / maxRadius),
    G,
  }
  const comps = componentMasses(mesh, rho, [ox, oy, oz], opts.components ?? faceComponents(mesh))
  if (comps) props.components = comps
  return props
}

/** Vertices per call of `farthestBlock` (called per block so that V8 optimises it early). */
const VERTEX_BLOCK = 16384

/** Largest squared distance from c to a vertex, m². */
function farthestSquared(P: Float64Array, c: Vec3): number {
  let max = 0
  const nv = P.length / 3
  for (let v = 0; v < nv; v += VERTEX_BLOCK) max = Math.max(max, farthestBlock(P, v, Math.min(nv, v + VERTEX_BLOCK), c[0], c[1], c[2]))
  return max
}

function farthestBlock(P: Float64Array, from: number, to: number, cx: number, cy: number, cz: number): number {
  let max = 0
  for (let v = from; v < to; v++) {
    const dx = P[3 * v]! - cx, dy = P[3 * v + 1]! - cy, dz = P[3 * v + 2]! - cz
    const r2 = dx * dx + dy * dy + dz * dz
    if (r2 > max) max = r2
  }
  return max
}

function componentMasses(mesh: TriMesh, rho: number, o: Vec3, { label, count }: { label: Uint32Array, count: number }): ComponentMass[] | undefined {
  if (count < 2) return undefined
  const P = mesh.positions, I = mesh.indices
  const v6 = new Float64Array(count), s = new Float64Array(3 * count), nf = new Uint32Array(count)
  for (let f = 0; f < label.length; f++) {
    const a = 3 * I[3 * f]!, b = 3 * I[3 * f + 1]!, c = 3 * I[3 * f + 2]!
    const ax = P[a]! - o[0], ay = P[a + 1]! - o[1], az = P[a + 2]! - o[2]
    const bx = P[b]! - o[0], by = P[b + 1]! - o[1], bz = P[b + 2]! - o[2]
    const qx = P[c]! - o[0], qy = P[c + 1]! - o[1], qz = P[c + 2]! - o[2]
    const d = ax * (by * qz - bz * qy) + ay * (bz * qx - bx * qz) + az * (bx * qy - by * qx)
    const L = label[f]!
    v6[L] = v6[L]! + d; nf[L] = nf[L]! + 1
    s[3 * L] = s[3 * L]! + d * (ax + bx + qx); s[3 * L + 1] = s[3 * L + 1]! + d * (ay + by + qy); s[3 * L + 2] = s[3 * L + 2]! + d * (az + bz + qz)
  }
  const out: ComponentMass[] = []
  for (let c = 0; c < count; c++) {
    const V = v6[c]! / 6
    out.push({ volume: V, mass: rho * V, faceCount: nf[c]!, centroid: [o[0] + s[3 * c]! / 24 / V, o[1] + s[3 * c + 1]! / 24 / V, o[2] + s[3 * c + 2]! / 24 / V] })
  }
  return out
}

/**
 * Same body under another density (kg m⁻³): mass, inertia and principal moments scale with ρ,
 * the escape speed with √ρ; volume, geometry, J2, C22, harmonics and semi-axes do not change.
 */
export function withDensity(props: MassProperties, density: number): MassProperties {
  if (!(density > 0) || !Number.isFinite(density)) throw new GeometryError('bad-argument', `withDensity: density must be a positive finite number, got ${density}`)
  const s = density / props.density
  return {
    ...props,
    density,
    mass: props.mass * s,
    inertia: props.inertia.map(r => r.map(v => v * s)) as Mat3,
    principalMoments: props.principalMoments.map(v => v * s) as Vec3,
    escapeSpeedPointMass: props.escapeSpeedPointMass * Math.sqrt(s),
    components: props.components?.map(c => ({ ...c, mass: c.mass * s })),
    ...(props.components ? {} : { components: undefined }),
  }
}

/** Same body with every coefficient re-expressed for reference radius R (m): C_lm ∝ R^−l. */
export function withReferenceRadius(props: MassProperties, R: number): MassProperties {
  if (!(R > 0) || !Number.isFinite(R)) throw new GeometryError('bad-argument', `withReferenceRadius: R must be positive, got ${R}`)
  const s2 = (props.referenceRadius / R) ** 2
  const d = props.degree2
  const out: MassProperties = {
    ...props,
    referenceRadius: R,
    J2: props.J2 * s2,
    C22: props.C22 * s2,
    C20Normalized: props.C20Normalized * s2,
    C22Normalized: props.C22Normalized * s2,
    degree2: { C20: d.C20 * s2, C21: d.C21 * s2, S21: d.S21 * s2, C22: d.C22 * s2, S22: d.S22 * s2 },
    harmonics: rescaleHarmonics(props.harmonics, R),
  }
  if (!props.components) delete out.components
  return out
}
