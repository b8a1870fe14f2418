import { z } from 'zod'
import type { ValidationReport, Vec3 } from '#shared/geometry'

/** Accepted bulk densities, kg m⁻³ (upload, edit, study overrides). */
export const DENSITY_RANGE_KG_M3 = { min: 1, max: 10_000 } as const
const densityMin = [DENSITY_RANGE_KG_M3.min, 'must be at least 1 kg m⁻³'] as const
const densityMax = [DENSITY_RANGE_KG_M3.max, 'must be at most 10 000 kg m⁻³'] as const

/**
 * Upload form fields (the file travels as multipart field `file`). Messages are predicates that
 * read after the field's label ("Bulk density: must be at least 1 kg m⁻³", see `labelIssue`).
 */
export const lobeUploadFieldsSchema = z.object({
  units: z.enum(['m', 'km'], { message: 'must be m or km' }).default('km'),
  density: z.coerce.number({ message: 'give it as a number in kg m⁻³, e.g. 500' }).min(...densityMin).max(...densityMax),
  name: z.string().trim().max(120, 'must be at most 120 characters').optional(),
  referenceRadius: z.coerce.number({ message: 'give it as a number in metres' }).positive('must be positive (m)').optional(),
  spinPeriodHours: z.coerce.number({ message: 'give it as a number in hours' }).positive('must be positive (h)').max(100_000, 'must be at most 100 000 h').optional(),
})

export const lobeUpdateSchema = z.object({
  name: z.string().trim().min(1, 'must not be empty').max(120, 'must be at most 120 characters').optional(),
  density: z.number({ message: 'give it as a number in kg m⁻³' }).min(...densityMin).max(...densityMax).optional(),
  referenceRadius: z.number({ message: 'give it as a number in metres' }).positive('must be positive (m)').nullable().optional(),
  spinPeriodHours: z.number({ message: 'give it as a number in hours' }).positive('must be positive (h)').max(100_000, 'must be at most 100 000 h').nullable().optional(),
  spinAxis: z.tuple([z.number(), z.number(), z.number()]).refine(v => Math.hypot(...v) > 0, 'must not be zero').nullable().optional(),
})

/**
 * What people call the lobe fields (upload form and Assumptions card). The API's `issues[].path`
 * keeps the field names; pages and messages written for people use these.
 */
export const LOBE_FIELD_LABELS: Record<string, string> = {
  file: 'Mesh file',
  units: 'Coordinate units',
  density: 'Bulk density',
  name: 'Name',
  referenceRadius: 'Reference radius',
  spinPeriodHours: 'Spin period',
  spinAxis: 'Spin axis',
}

/** "density" + "must be at least 1 kg m⁻³" → "Bulk density: must be at least 1 kg m⁻³". */
export function labelIssue(issue: { path: string, message: string }): string {
  const label = LOBE_FIELD_LABELS[issue.path]
  return label ? `${label}: ${issue.message}` : `${issue.path}: ${issue.message}`
}

const vec3 = z.tuple([z.number(), z.number(), z.number()])

/** `POST /api/lobes/:id/split` body. */
export const lobeSplitSchema = z.object({
  /**
   * Cutting plane: point in METRES in the lobe's file axes and origin (SI at the API, also for lobes
   * uploaded in km), normal any non-zero vector; default: the neck found along the long principal axis.
   */
  plane: z.object({ point: vec3, normal: vec3.refine(v => Math.hypot(...v) > 0, 'normal must not be zero') }).optional(),
})

export const LOBE_SORTS = ['createdAt', 'name', 'faceCount', 'volume', 'density'] as const
export const lobeListQuerySchema = z.object({
  q: z.string().trim().max(120).optional(),
  sort: z.enum(LOBE_SORTS).default('createdAt'),
  order: z.enum(['asc', 'desc']).default('desc'),
  limit: z.coerce.number().int().min(1).max(200).default(25),
  offset: z.coerce.number().int().min(0).default(0),
  owner: z.coerce.number().int().positive().optional(),
})

/** Where a derived lobe came from: a cut at another lobe's neck, or a study's merged body. */
export type LobeOrigin
  = | { kind: 'cut', lobeId: number, lobeName: string, side: string, plane: { point: Vec3, normal: Vec3 }, neckArea: number }
    | { kind: 'merged', studyId: number, studyTitle: string | null, density: number, spinPeriodHours: number | null }

/** A lobe's stored validation report (without the per-face origin map), as the API serves it. */
export type LobeReport = Omit<ValidationReport, 'faceOrigin'> & {
  /** Faces in the file before triangulation, and polygons split into triangles. */
  sourceFaceCount?: number
  triangulatedPolygons?: number
  /** Reading and analysis times, milliseconds. */
  timingsMs?: Record<string, number>
  /** Earlier lobes made from the same file (same content hash). */
  sameFile?: { id: number, name: string, units: string }[]
  origin?: LobeOrigin
}

/** Statistics of a lobe's surface fields (SI: m s⁻², degrees, m, m s⁻¹). */
export interface SurfaceSummary {
  /** Which points carry the field: every face centroid of the analysis mesh ('mesh'); 'simplified' only in summaries written before. */
  evaluation: { surface: 'mesh' | 'simplified', points: number, meshFaces: number }
  /** Treecode accuracy requested (relative) and the error estimated from sampled direct-sum checks (samples, max relative errors of U and |g|). */
  accuracy?: { requested: { potential: number, gravity: number }, estimated: { samples: number, maxRelativePotential: number, maxRelativeGravity: number, maxRelativeAcceleration: number, method: string } }
  /** ḡ of the geopotential height, m s⁻² (area-weighted mean of the effective acceleration). */
  meanGravity?: number
  surfaceGravity: { min: number, max: number, mean: number }
  slopeDeg: { min: number, max: number, mean: number }
  geopotentialHeight: { min: number, max: number, mean: number }
  escapeSpeedSurface: { min: number, max: number, mean: number }
  spin: { periodHours: number, axis: Vec3 } | null
  /**
   * Where the slope exceeds 90° the net of gravity and the spin's centrifugal acceleration points
   * away from the surface: loose material there lifts off. Area-weighted fraction (0..1) and the
   * number of evaluation points; absent in summaries written before it was computed.
   */
  liftOff?: { areaFraction: number, points: number }
  fieldsFile: string
}
