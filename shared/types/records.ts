import { z } from 'zod'
import { RECORD_SUBJECTS, STUDY_ONLY_SUBJECTS, quantityDef } from '#shared/types/quantities'

/** One schema per form, used by the record pages and the handlers. */

export const POPULATIONS = ['kuiper-belt', 'jupiter-family-comet', 'near-earth', 'main-belt', 'other'] as const
export type Population = (typeof POPULATIONS)[number]
export const POPULATION_LABELS: Record<Population, string> = {
  'kuiper-belt': 'Kuiper belt',
  'jupiter-family-comet': 'Jupiter-family comet',
  'near-earth': 'Near-Earth',
  'main-belt': 'Main belt',
  'other': 'Other',
}

export const ATTACHMENT_STATES = ['proposed', 'accepted', 'rejected', 'superseded'] as const
export type AttachmentState = (typeof ATTACHMENT_STATES)[number]

/** Heliocentric osculating elements: semi-major axis in au, eccentricity, inclination in degrees. */
export const heliocentricOrbitSchema = z.object({
  semiMajorAxisAu: z.number({ message: 'Give the semi-major axis in au' }).gt(0, 'Semi-major axis must be positive (au)').max(100_000, 'Semi-major axis must be at most 100 000 au'),
  eccentricity: z.number({ message: 'Give the eccentricity' }).min(0, 'Eccentricity must be at least 0').lt(1, 'Eccentricity must be below 1 (bound orbit)'),
  inclinationDeg: z.number({ message: 'Give the inclination in degrees' }).min(0, 'Inclination must be at least 0°').max(180, 'Inclination must be at most 180°'),
})
export type HeliocentricOrbit = z.infer<typeof heliocentricOrbitSchema>

// The patterns accept the empty string: an empty field gets only the "enter …" message.
export const recordDesignationSchema = z.string().trim()
  .min(1, 'Enter a designation').max(60, 'Use at most 60 characters')
  .regex(/^(?:[\p{L}\p{N}][\p{L}\p{N} ()/'+._-]*)?$/u, 'Use letters, digits, spaces and ( ) / \' + . _ - only')
export const recordTagSchema = z.string().trim().toLowerCase()
  .min(1, 'Tags cannot be empty').max(40, 'Tags have at most 40 characters')
  .regex(/^(?:[\p{L}\p{N}][\p{L}\p{N} ._-]*)?$/u, 'Tags use letters, digits, spaces and . _ - only')

const idList = z.array(z.number().int().positive()).max(200, 'At most 200 links')

const objectFields = {
  designation: recordDesignationSchema,
  name: z.string().trim().min(1, 'Enter a name').max(120, 'Use at most 120 characters'),
  population: z.enum(POPULATIONS, { message: 'Choose a population' }),
  notes: z.string().max(20_000, 'Notes have at most 20 000 characters'),
  orbit: heliocentricOrbitSchema.nullable(),
  tags: z.array(recordTagSchema).max(30, 'At most 30 tags').transform(t => [...new Set(t)].sort()),
  lobes: idList,
  studies: idList,
}

export const objectCreateSchema = z.object({
  ...objectFields,
  population: objectFields.population.default('other'),
  notes: objectFields.notes.default(''),
  orbit: objectFields.orbit.default(null),
  tags: objectFields.tags.default([]),
  lobes: idList.default([]),
  studies: idList.default([]),
})
export type ObjectCreate = z.infer<typeof objectCreateSchema>

/** Every field optional; `lobes` / `studies` replace the manual links (links made by attachments stay). */
export const objectUpdateSchema = z.object(objectFields).partial()
  .refine(v => Object.keys(v).length > 0, 'Change at least one field')
export type ObjectUpdate = z.infer<typeof objectUpdateSchema>

export const OBJECT_SORTS = ['designation', 'name', 'population', 'createdAt', 'updatedAt', 'proposed', 'accepted'] as const
export const objectListQuerySchema = z.object({
  q: z.string().trim().max(120).optional(),
  population: z.enum(POPULATIONS).optional(),
  tag: recordTagSchema.optional(),
  sort: z.enum(OBJECT_SORTS).default('designation'),
  order: z.enum(['asc', 'desc']).default('asc'),
  limit: z.coerce.number().int().min(1).max(200).default(25),
  offset: z.coerce.number().int().min(0).default(0),
  /**
   * `review`: only records with values awaiting review that the caller did not propose, with
   * `awaitingCount`. `mine`: only records where the caller proposed values, with `mine` counts by state.
   */
  awaiting: z.enum(['review', 'mine']).optional(),
})
export type ObjectListQuery = z.infer<typeof objectListQuerySchema>

const quantityKeys = z.array(z.string().refine(k => !!quantityDef(k), { message: 'Unknown quantity' }))
  .min(1, 'Pick at least one quantity').max(100)
  .refine(keys => new Set(keys).size === keys.length, 'Each quantity once')

/** Attach from a lobe (with the subject it stands for) or from a finished study. */
export const attachSchema = z.union([
  z.object({
    lobe: z.number().int().positive(),
    subject: z.enum(RECORD_SUBJECTS).exclude([...STUDY_ONLY_SUBJECTS]).default('whole-body'),
    quantities: quantityKeys,
    note: z.string().trim().max(2000).default(''),
  }).strict(),
  z.object({
    study: z.number().int().positive(),
    quantities: quantityKeys,
    note: z.string().trim().max(2000).default(''),
  }).strict(),
], { message: 'Give either { lobe, quantities } or { study, quantities }' })
export type AttachRequest = z.infer<typeof attachSchema>

export const attachPreviewQuerySchema = z.union([
  z.object({ lobe: z.coerce.number().int().positive() }).strict(),
  z.object({ study: z.coerce.number().int().positive() }).strict(),
], { message: 'Give ?lobe=<id> or ?study=<id>' })

export const attachmentReviewSchema = z.object({
  decision: z.enum(['accept', 'reject'], { message: 'Decide accept or reject' }),
  comment: z.string().trim().max(4000, 'Use at most 4000 characters').default(''),
}).refine(v => v.decision === 'accept' || v.comment.length > 0, { message: 'Say why the value is rejected', path: ['comment'] })
export type AttachmentReviewRequest = z.infer<typeof attachmentReviewSchema>

export const attachmentCommentSchema = z.object({
  body: z.string().trim().min(1, 'Write a comment').max(4000, 'Use at most 4000 characters'),
})

export const RECORD_MAIL_KINDS = ['proposals', 'decisions', 'comments'] as const
export type RecordMailKind = (typeof RECORD_MAIL_KINDS)[number]
export const RECORD_MAIL_KIND_LABELS: Record<RecordMailKind, string> = {
  proposals: 'New values proposed on records I follow (reviewers and admins)',
  decisions: 'Decisions on values I proposed',
  comments: 'Comments on values on records I follow',
}
export const recordMailPreferencesSchema = z.object({
  proposals: z.boolean(),
  decisions: z.boolean(),
  comments: z.boolean(),
}).partial().refine(v => Object.keys(v).length > 0, 'Change at least one preference')
