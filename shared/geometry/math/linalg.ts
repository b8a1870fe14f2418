/**
 * The core's one module of small vector, 3×3-matrix and Hamilton-quaternion helpers.
 *
 * Vectors are `Vec3` tuples; matrices are row-major `Mat3` (`m[row][col]`) acting on column
 * vectors: v' = M v. Quaternions are Hamilton, scalar first: q = [w, x, y, z], and describe ACTIVE
 * rotations: `rotateVector(q, v)` = q v q*. A rotation matrix and its quaternion are the same
 * active rotation. The symmetric eigen-solver is in `eigen.ts`, the seeded generator in `rng.ts`.
 */
import type { Mat3, Quat, Vec3 } from '../types'
import { GeometryError } from '../types'

const DEG = Math.PI / 180

// ---------------------------------------------------------------- vectors
export const add = (a: Vec3, b: Vec3): Vec3 => [a[0] + b[0], a[1] + b[1], a[2] + b[2]]
export const sub = (a: Vec3, b: Vec3): Vec3 => [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
export const scale = (a: Vec3, s: number): Vec3 => [a[0] * s, a[1] * s, a[2] * s]
export const dot = (a: Vec3, b: Vec3): number => a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
export const cross = (a: Vec3, b: Vec3): Vec3 => [
  a[1] * b[2] - a[2] * b[1],
  a[2] * b[0] - a[0] * b[2],
  a[0] * b[1] - a[1] * b[0],
]
export const norm = (a: Vec3): number => Math.hypot(a[0], a[1], a[2])
/** Unit vector along `a`; throws GeometryError('zero-vector') for a zero (or non-finite) vector. */
export function normalize(a: Vec3, what = 'vector'): Vec3 {
  const n = norm(a)
  if (!(n > 0) || !Number.isFinite(n)) throw new GeometryError('zero-vector', `normalize: ${what} has zero or non-finite length`)
  return [a[0] / n, a[1] / n, a[2] / n]
}
/** Angle between two vectors, degrees, in [0, 180]. */
export function angleBetweenDeg(a: Vec3, b: Vec3): number {
  return Math.atan2(norm(cross(a, b)), dot(a, b)) / DEG
}
/** Component of `v` perpendicular to unit `u`. */
export const rejectFrom = (v: Vec3, u: Vec3): Vec3 => sub(v, scale(u, dot(v, u)))
/** Some unit vector perpendicular to unit `u`. */
export function anyPerpendicular(u: Vec3): Vec3 {
  const t: Vec3 = Math.abs(u[0]) < 0.6 ? [1, 0, 0] : Math.abs(u[1]) < 0.6 ? [0, 1, 0] : [0, 0, 1]
  return normalize(rejectFrom(t, u))
}

// ---------------------------------------------------------------- 3×3 matrices
export const identity3 = (): Mat3 => [[1, 0, 0], [0, 1, 0], [0, 0, 1]]
export const matVec = (m: Mat3, v: Vec3): Vec3 => [
  m[0][0] * v[0] + m[0][1] * v[1] + m[0][2] * v[2],
  m[1][0] * v[0] + m[1][1] * v[1] + m[1][2] * v[2],
  m[2][0] * v[0] + m[2][1] * v[1] + m[2][2] * v[2],
]
export const transpose = (m: Mat3): Mat3 => [
  [m[0][0], m[1][0], m[2][0]],
  [m[0][1], m[1][1], m[2][1]],
  [m[0][2], m[1][2], m[2][2]],
]
export function matMul(a: Mat3, b: Mat3): Mat3 {
  const r: Mat3 = [[0, 0, 0], [0, 0, 0], [0, 0, 0]]
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) r[i][j] = a[i][0] * b[0][j] + a[i][1] * b[1][j] + a[i][2] * b[2][j]
  return r
}
export const det3 = (m: Mat3): number =>
  m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1])
  - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0])
  + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0])
/** Inverse of a 3×3 matrix; throws GeometryError('singular-matrix') when |det| is ~0. */
export function inverse3(m: Mat3): Mat3 {
  const d = det3(m)
  const s = Math.max(...m.flat().map(Math.abs))
  if (!(Math.abs(d) > 1e-300 && Math.abs(d) > 1e-14 * s * s * s)) throw new GeometryError('singular-matrix', 'inverse3: matrix is singular')
  const c = (i: number, j: number) => {
    const r = [0, 1, 2].filter(k => k !== i)
    const q = [0, 1, 2].filter(k => k !== j)
    return ((i + j) % 2 ? -1 : 1) * (m[r[0]][q[0]] * m[r[1]][q[1]] - m[r[0]][q[1]] * m[r[1]][q[0]])
  }
  return [
    [c(0, 0) / d, c(1, 0) / d, c(2, 0) / d],
    [c(0, 1) / d, c(1, 1) / d, c(2, 1) / d],
    [c(0, 2) / d, c(1, 2) / d, c(2, 2) / d],
  ]
}
/** R M Rᵀ — a tensor given in frame F expressed in the frame that R maps F into. */
export const rotateTensor = (r: Mat3, m: Mat3): Mat3 => matMul(matMul(r, m), transpose(r))

// ---------------------------------------------------------------- quaternions
export const quatIdentity = (): Quat => [1, 0, 0, 0]
/** Unit quaternion with w ≥ 0 (q and −q are the same rotation). Throws for a zero quaternion. */
export function quatNormalize(q: Quat): Quat {
  const n = Math.hypot(q[0], q[1], q[2], q[3])
  if (!(n > 0) || !Number.isFinite(n)) throw new GeometryError('bad-quaternion', 'quatNormalize: quaternion has zero or non-finite length')
  const s = q[0] < 0 ? -1 / n : 1 / n
  return [q[0] * s, q[1] * s, q[2] * s, q[3] * s]
}
/** Hamilton product a ⊗ b (apply b first, then a). */
export function quatMultiply(a: Quat, b: Quat): Quat {
  return [
    a[0] * b[0] - a[1] * b[1] - a[2] * b[2] - a[3] * b[3],
    a[0] * b[1] + a[1] * b[0] + a[2] * b[3] - a[3] * b[2],
    a[0] * b[2] - a[1] * b[3] + a[2] * b[0] + a[3] * b[1],
    a[0] * b[3] + a[1] * b[2] - a[2] * b[1] + a[3] * b[0],
  ]
}
export const quatConjugate = (q: Quat): Quat => [q[0], -q[1], -q[2], -q[3]]
/** Rotation by `angleRad` about unit `axis` (right-hand rule). */
export function quatFromAxisAngle(axis: Vec3, angleRad: number): Quat {
  const u = normalize(axis, 'axis')
  const s = Math.sin(angleRad / 2)
  return [Math.cos(angleRad / 2), u[0] * s, u[1] * s, u[2] * s]
}
/** Active rotation matrix of a (normalised) quaternion. */
export function quatToMat3(qIn: Quat): Mat3 {
  const [w, x, y, z] = quatNormalize(qIn)
  return [
    [1 - 2 * (y * y + z * z), 2 * (x * y - w * z), 2 * (x * z + w * y)],
    [2 * (x * y + w * z), 1 - 2 * (x * x + z * z), 2 * (y * z - w * x)],
    [2 * (x * z - w * y), 2 * (y * z + w * x), 1 - 2 * (x * x + y * y)],
  ]
}
/** Quaternion (w ≥ 0) of a proper rotation matrix (Shepperd's method). Throws if det ≤ 0. */
export function mat3ToQuat(m: Mat3): Quat {
  if (!(det3(m) > 0)) throw new GeometryError('not-a-rotation', 'mat3ToQuat: matrix is not a proper rotation (det ≤ 0)')
  const tr = m[0][0] + m[1][1] + m[2][2]
  let q: Quat
  if (tr > 0) {
    const s = 2 * Math.sqrt(1 + tr)
    q = [s / 4, (m[2][1] - m[1][2]) / s, (m[0][2] - m[2][0]) / s, (m[1][0] - m[0][1]) / s]
  }
  else if (m[0][0] > m[1][1] && m[0][0] > m[2][2]) {
    const s = 2 * Math.sqrt(1 + m[0][0] - m[1][1] - m[2][2])
    q = [(m[2][1] - m[1][2]) / s, s / 4, (m[0][1] + m[1][0]) / s, (m[0][2] + m[2][0]) / s]
  }
  else if (m[1][1] > m[2][2]) {
    const s = 2 * Math.sqrt(1 + m[1][1] - m[0][0] - m[2][2])
    q = [(m[0][2] - m[2][0]) / s, (m[0][1] + m[1][0]) / s, s / 4, (m[1][2] + m[2][1]) / s]
  }
  else {
    const s = 2 * Math.sqrt(1 + m[2][2] - m[0][0] - m[1][1])
    q = [(m[1][0] - m[0][1]) / s, (m[0][2] + m[2][0]) / s, (m[1][2] + m[2][1]) / s, s / 4]
  }
  return quatNormalize(q)
}
/** q v q* for a unit quaternion q. */
export const rotateVector = (q: Quat, v: Vec3): Vec3 => matVec(quatToMat3(q), v)

/**
 * Rotation from Euler angles in DEGREES, intrinsic z-y′-x″ (yaw about z, then pitch about the new
 * y′, then roll about the newest x″): R = Rz(yaw) · Ry(pitch) · Rx(roll), as an active rotation.
 */
export function quatFromEulerZYXDeg(yawDeg: number, pitchDeg: number, rollDeg: number): Quat {
  const qz = quatFromAxisAngle([0, 0, 1], yawDeg * DEG)
  const qy = quatFromAxisAngle([0, 1, 0], pitchDeg * DEG)
  const qx = quatFromAxisAngle([1, 0, 0], rollDeg * DEG)
  return quatNormalize(quatMultiply(quatMultiply(qz, qy), qx))
}

/**
 * "Long axes aligned": the active rotation of B (about its centroid) that carries B's principal
 * frame onto A's, i.e. B's long (smallest-moment) axis onto A's long axis, intermediate onto
 * intermediate, short onto short. `axesA`, `axesB` hold unit principal axes as ROWS in each lobe's
 * file frame (as mass.ts returns them). Left-handed frames are made right-handed by flipping the
 * third row. Returns R = Aᵀ·B as a quaternion (x_A = R x_B).
 */
export function quatAlignPrincipalFrames(axesA: Mat3, axesB: Mat3): Quat {
  const fix = (m: Mat3): Mat3 => (det3(m) < 0 ? [m[0], m[1], scale(m[2], -1)] : m)
  return mat3ToQuat(matMul(transpose(fix(axesA)), fix(axesB)))
}
