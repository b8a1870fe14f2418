/**
 * What `validateMesh` returns and accepts, and how its errors list faces.
 */
import type { TriMesh } from '../types'
import { MAX_LISTED } from '../types'

export interface ValidationWarning { code: string, message: string }

export interface ValidationReport {
  warnings: ValidationWarning[]
  /** Vertices and triangles of the returned mesh. */
  vertexCount: number
  faceCount: number
  inputVertexCount: number
  inputFaceCount: number
  /** Vertices merged into another within the weld tolerance. */
  weldedVertices: number
  /** Weld tolerance used, metres (weldTolerance × bounding-box diagonal). */
  weldToleranceMetres: number
  unreferencedVertices: number
  /** Zero-area triangles (collapsed after welding or collinear) that were dropped. */
  degenerateFaces: number
  /** Triangles whose winding was reversed to agree with their neighbours. */
  flippedFaces: number
  /** True when at least one component was inside-out (negative volume) and was reversed. */
  invertedOrientation: boolean
  invertedComponents: number
  /** Connected components (faces joined through shared edges), largest first. */
  components: number
  componentFaceCounts: number[]
  /** Signed volume after repair, m³ (positive). */
  volume: number
  /** firstPairs: face numbers in the file when the input carries `sourceFace`, else triangle indices. */
  selfIntersections: { checked: boolean, count: number, firstPairs: [number, number][] }
  /** For each output triangle, the index of the input triangle it came from. */
  faceOrigin: Uint32Array
}

/** What `validateMesh` returns. */
export interface ValidatedMesh {
  mesh: TriMesh
  report: ValidationReport
  /**
   * Component of each returned triangle (0 .. components − 1, numbered in order of first
   * triangle): the same labels `faceComponents(mesh)` gives for the returned mesh, so callers
   * can skip recomputing them.
   */
  componentLabels: Uint32Array
}

export interface ValidateOptions {
  /** Weld distance as a fraction of the bounding-box diagonal (default 1e-9; 0 welds exact duplicates only). */
  weldTolerance?: number
  /**
   * 'auto' (default): weld only when the input has boundary edges; 'always'; 'never'.
   */
  weld?: 'auto' | 'always' | 'never'
  /** Run the self-intersection check only up to this many faces (default 300 000). */
  selfIntersectionMaxFaces?: number
}

export function issuesFor(faces: ArrayLike<number>, msg: string, kind = 'faces'): { path: string, message: string }[] {
  return Array.from(faces).slice(0, MAX_LISTED).map(f => ({ path: `${kind}[${f}]`, message: msg }))
}
