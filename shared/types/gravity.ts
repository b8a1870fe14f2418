import { z } from 'zod'

/** GET /api/lobes/:id/fields: every face of the analysis mesh (default), or the display copy for the 3D view. */
export const lobeFieldsQuerySchema = z.object({
  on: z.enum(['mesh', 'display']).default('mesh'),
})

/** GET /api/lobes/:id/harmonics. */
export const lobeHarmonicsQuerySchema = z.object({
  degree: z.coerce.number().int().min(2).max(64).default(16),
  frame: z.enum(['principal', 'file']).default('principal'),
  format: z.enum(['json', 'csv', 'txt']).default('json'),
  /** Reference radius in metres; default: the lobe's reference radius (volume-equivalent unless set). */
  referenceRadius: z.coerce.number().positive().finite().optional(),
})
