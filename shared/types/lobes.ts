import { z } from 'zod'

/** Upload form fields (the file travels as multipart field `file`). */
export const lobeUploadFieldsSchema = z.object({
  units: z.enum(['m', 'km']).default('km'),
  density: z.coerce.number({ message: 'Give the bulk density in kg m⁻³' }).min(1, 'Density must be at least 1 kg m⁻³').max(10_000, 'Density must be at most 10 000 kg m⁻³'),
  name: z.string().trim().max(120).optional(),
  referenceRadius: z.coerce.number().positive('Reference radius must be positive (m)').optional(),
  spinPeriodHours: z.coerce.number().positive('Spin period must be positive (h)').max(100_000).optional(),
})

export const lobeUpdateSchema = z.object({
  name: z.string().trim().min(1).max(120).optional(),
  density: z.number().min(1).max(10_000).optional(),
  referenceRadius: z.number().positive().nullable().optional(),
  spinPeriodHours: z.number().positive().max(100_000).nullable().optional(),
  spinAxis: z.tuple([z.number(), z.number(), z.number()]).refine(v => Math.hypot(...v) > 0, 'Spin axis must not be zero').nullable().optional(),
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
