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
  /**
   * Set by the file readers: for each triangle, the number of the face in the file it came from,
   * counting from 0 in file order (the n-th `f` line or face element). Polygons are split into
   * triangles, so several triangles can share one face. Validation messages use it to name faces
   * as the file numbers them; meshes built in code leave it out.
   */
  sourceFace?: Uint32Array
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

/** How messages number the faces of an uploaded file (see `TriMesh.sourceFace`). */
export const FILE_FACE_NUMBERING = 'faces are numbered from 0 in file order: the first face line or face element is face 0'

/** How many faces or vertices an error message or a report lists at most. */
export const MAX_LISTED = 5
