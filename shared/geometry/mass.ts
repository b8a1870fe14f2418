/**
 * Mass properties of a closed, consistently oriented (outward, CCW) triangle mesh of constant
 * density, by signed tetrahedra (SCIENCE.md §1; Mirtich 1996, Kallay 2006). SI units throughout:
 * positions in metres, density kg m⁻³. Accumulation is in float64 relative to the bounding-box
 * centre (subtracted first) to limit cancellation on large coordinates.
 *
 * Frames: "file" = the axes and origin of the input coordinates; "principal" = origin at the
 * centroid, axes = rows of `rotationToPrincipal` (x along the smallest moment A, z along C).
 */
import type { Mat3, TriMesh, Vec3 } from './types'
import { GeometryError } from './types'
import { symmetricEigen } from './linalg'
import { faceComponents } from './validate'
import { harmonicIntegralsFromMoments, harmonicsFromIntegrals, polyhedronMoments34, rescaleHarmonics } from './harmonics'
import type { Harmonics } from './harmonics'

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
  let minx = Infinity, miny = Infinity, minz = Infinity, maxx = -Infinity, maxy = -Infinity, maxz = -Infinity
  for (let v = 0; v < nv; v++) {
    const x = P[3 * v]!, y = P[3 * v + 1]!, z = P[3 * v + 2]!
    if (x < minx) minx = x; if (x > maxx) maxx = x
    if (y < miny) miny = y; if (y > maxy) maxy = y
    if (z < minz) minz = z; if (z > maxz) maxz = z
  }
  const ox = (minx + maxx) / 2, oy = (miny + maxy) / 2, oz = (minz + maxz) / 2
  const sums = new Float64Array(SUMS)
  for (let f = 0; f < I.length; f += BLOCK) secondMomentsBlock(P, I, ox, oy, oz, f, Math.min(I.length, f + BLOCK), sums)
  const V6 = sums[0]!, area2 = sums[1]!, sx = sums[2]!, sy = sums[3]!, sz = sums[4]!
  const cxx = sums[5]!, cyy = sums[6]!, czz = sums[7]!, cxy = sums[8]!, cxz = sums[9]!, cyz = sums[10]!
  const volume = V6 / 6
  if (!(volume > 0)) throw new GeometryError('inside-out', `massProperties: the signed volume is ${volume <= 0 ? 'not positive' : 'not finite'} (${volume}); the mesh is inside-out or not closed (run validateMesh first)`)
  // first moment: Σ V_t (a+b+c)/4 = Σ d·t/24
  const gx = sx / 24 / volume, gy = sy / 24 / volume, gz = sz / 24 / volume
  const k = 1 / 120 // d/6 · 1/20
  // second moment about the centroid, per unit density: C_cm = C_o − V g gᵀ
  const Cxx = cxx * k - volume * gx * gx, Cyy = cyy * k - volume * gy * gy, Czz = czz * k - volume * gz * gz
  const Cxy = cxy * k - volume * gx * gy, Cxz = cxz * k - volume * gx * gz, Cyz = cyz * k - volume * gy * gz
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
  // monomial moments about o, degree 0..4 (order of MONOMIALS: 1; x y z; xx xy xz yy yz zz; ...)
  const m34 = polyhedronMoments34(mesh, [ox, oy, oz])
  const moments = new Float64Array(35)
  moments.set([volume, sx / 24, sy / 24, sz / 24, cxx * k, cxy * k, cxz * k, cyy * k, cyz * k, czz * k], 0)
  moments.set(m34, 10)
  const ints = harmonicIntegralsFromMoments(moments, [gx, gy, gz], axes)
  const harmonics = harmonicsFromIntegrals(ints, volume, R, 'principal')
  let maxR2 = 0
  for (let v = 0; v < nv; v++) {
    const dx = P[3 * v]! - centroid[0], dy = P[3 * v + 1]! - centroid[1], dz = P[3 * v + 2]! - centroid[2]
    const r2 = dx * dx + dy * dy + dz * dz
    if (r2 > maxR2) maxR2 = r2
  }
  const maxRadius = Math.sqrt(maxR2)
  const props: MassProperties = {
    density: rho,
    volume,
    surfaceArea: area2 / 2,
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

/** Number of sums kept by `secondMomentsBlock`. */
const SUMS = 11
/** Faces per block (× 3 indices): see `secondMomentsBlock`. */
const BLOCK = 3 * 4096

/**
 * Adds, over the faces with indices [from, to), to sums: 6V, 2·area, Σ 6V_t·(a+b+c) (3), and
 * Σ 6V_t·(aaᵀ + bbᵀ + ccᵀ + ssᵀ) as xx yy zz xy xz yz, s = a+b+c, coordinates relative to o (m).
 * Called per block of faces so that V8 compiles it with unboxed float64 sums before the bulk of
 * the work (one long loop runs first as on-stack-replaced code, whose sums stay boxed).
 */
function secondMomentsBlock(P: Float64Array, I: Uint32Array, ox: number, oy: number, oz: number, from: number, to: number, sums: Float64Array): void {
  let V6 = 0, area2 = 0
  let sx = 0, sy = 0, sz = 0
  let cxx = 0, cyy = 0, czz = 0, cxy = 0, cxz = 0, cyz = 0
  for (let f = from; f < to; f += 3) {
    const a = 3 * I[f]!, b = 3 * I[f + 1]!, c = 3 * I[f + 2]!
    const ax = P[a]! - ox, ay = P[a + 1]! - oy, az = P[a + 2]! - oz
    const bx = P[b]! - ox, by = P[b + 1]! - oy, bz = P[b + 2]! - oz
    const qx = P[c]! - ox, qy = P[c + 1]! - oy, qz = P[c + 2]! - oz
    const d = ax * (by * qz - bz * qy) + ay * (bz * qx - bx * qz) + az * (bx * qy - by * qx) // 6 V_t
    V6 += d
    const ux = bx - ax, uy = by - ay, uz = bz - az, wx = qx - ax, wy = qy - ay, wz = qz - az
    const nx = uy * wz - uz * wy, ny = uz * wx - ux * wz, nz = ux * wy - uy * wx
    area2 += Math.sqrt(nx * nx + ny * ny + nz * nz)
    const tx = ax + bx + qx, ty = ay + by + qy, tz = az + bz + qz
    sx += d * tx; sy += d * ty; sz += d * tz
    // (V_t/20)[aaᵀ + bbᵀ + qqᵀ + ssᵀ]
    cxx += d * (ax * ax + bx * bx + qx * qx + tx * tx)
    cyy += d * (ay * ay + by * by + qy * qy + ty * ty)
    czz += d * (az * az + bz * bz + qz * qz + tz * tz)
    cxy += d * (ax * ay + bx * by + qx * qy + tx * ty)
    cxz += d * (ax * az + bx * bz + qx * qz + tx * tz)
    cyz += d * (ay * az + by * bz + qy * qz + ty * tz)
  }
  const add = [V6, area2, sx, sy, sz, cxx, cyy, czz, cxy, cxz, cyz]
  for (let k = 0; k < SUMS; k++) sums[k] = sums[k]! + add[k]!
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
