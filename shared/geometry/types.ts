/**
 * Core mesh types shared by the numerical modules. SI units (metres) unless a name says otherwise.
 * Triangles are wound counter-clockwise seen from outside (outward normals by the right-hand rule).
 */

/** An indexed triangle mesh. `positions` holds x,y,z per vertex; `indices` holds 3 vertex indices per face. */
export interface TriMesh {
  /** Vertex coordinates, metres, interleaved x0,y0,z0,x1,... */
  positions: Float64Array
  /** Vertex indices, three per triangle. */
  indices: Uint32Array
}

export type Vec3 = [number, number, number]
export type Mat3 = [Vec3, Vec3, Vec3]
/** Hamilton unit quaternion, scalar first: [w, x, y, z]. */
export type Quat = [number, number, number, number]

/** Thrown by the core for input it cannot use. `code` is stable; `message` says what and where. */
export class GeometryError extends Error {
  readonly code: string
  readonly issues: { path: string, message: string }[]
  constructor(code: string, message: string, issues: { path: string, message: string }[] = []) {
    super(message)
    this.name = 'GeometryError'
    this.code = code
    this.issues = issues
  }
}
