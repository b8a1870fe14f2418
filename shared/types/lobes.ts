import { z } from 'zod'

/**
 * Upload form fields (the file travels as multipart field `file`). Messages are predicates that
 * read after the field's label ("Bulk density: must be at least 1 kg m⁻³", see `labelIssue`).
 */
export const lobeUploadFieldsSchema = z.object({
  units: z.enum(['m', 'km'], { message: 'must be m or km' }).default('km'),
  density: z.coerce.number({ message: 'give it as a number in kg m⁻³, e.g. 500' }).min(1, 'must be at least 1 kg m⁻³').max(10_000, 'must be at most 10 000 kg m⁻³'),
  name: z.string().trim().max(120, 'must be at most 120 characters').optional(),
  referenceRadius: z.coerce.number({ message: 'give it as a number in metres' }).positive('must be positive (m)').optional(),
  spinPeriodHours: z.coerce.number({ message: 'give it as a number in hours' }).positive('must be positive (h)').max(100_000, 'must be at most 100 000 h').optional(),
})

export const lobeUpdateSchema = z.object({
  name: z.string().trim().min(1, 'must not be empty').max(120, 'must be at most 120 characters').optional(),
  density: z.number({ message: 'give it as a number in kg m⁻³' }).min(1, 'must be at least 1 kg m⁻³').max(10_000, 'must be at most 10 000 kg m⁻³').optional(),
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

export const LOBE_SORTS = ['createdAt', 'name', 'faceCount', 'volume', 'density'] as const
export const lobeListQuerySchema = z.object({
  q: z.string().trim().max(120).optional(),
  sort: z.enum(LOBE_SORTS).default('createdAt'),
  order: z.enum(['asc', 'desc']).default('desc'),
  limit: z.coerce.number().int().min(1).max(200).default(25),
  offset: z.coerce.number().int().min(0).default(0),
  owner: z.coerce.number().int().positive().optional(),
})
