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

const SUBJECT_CHOICES = 'lobe A, lobe B, whole body, lobe pair (approach) or merged body'

/**
 * Attach values to a record: from a lobe (`lobe`) or a finished study (`study`), always with the
 * subject the values describe — there is no default. A lobe stands for lobe A, lobe B or the whole
 * body; a study's values describe the lobe pair (approach), the whole (joined) body or the merged
 * body, each quantity exactly one of them (checked by the handler against the catalogue).
 */
export const attachSchema = z.object({
  lobe: z.number().int().positive().optional(),
  study: z.number().int().positive().optional(),
  subject: z.enum(RECORD_SUBJECTS, { message: `Choose what the values describe: ${SUBJECT_CHOICES}` }),
  quantities: quantityKeys,
  note: z.string().trim().max(2000).default(''),
}).strict().superRefine((v, ctx) => {
  if ((v.lobe === undefined) === (v.study === undefined)) {
    ctx.addIssue({ code: 'custom', path: [v.lobe === undefined ? 'lobe' : 'study'], message: 'Give either a lobe or a study, not both' })
  }
  if (v.lobe !== undefined && (STUDY_ONLY_SUBJECTS as readonly string[]).includes(v.subject)) {
    ctx.addIssue({ code: 'custom', path: ['subject'], message: 'A single lobe stands for lobe A, lobe B or the whole body; lobe pair and merged body come from a study' })
  }
})
export type AttachRequest = z.infer<typeof attachSchema>

/** `?lobe=<id>` or `?study=<id>`, and optionally `object=<record id>` for a subject suggestion that knows the record. */
export const attachPreviewQuerySchema = z.object({
  lobe: z.coerce.number().int().positive().optional(),
  study: z.coerce.number().int().positive().optional(),
  object: z.coerce.number().int().positive().optional(),
}).strict().refine(v => (v.lobe === undefined) !== (v.study === undefined), { message: 'Give ?lobe=<id> or ?study=<id>' })

export const attachmentReviewSchema = z.object({
  decision: z.enum(['accept', 'reject'], { message: 'Decide accept or reject' }),
  comment: z.string().trim().max(4000, 'Use at most 4000 characters').default(''),
}).refine(v => v.decision === 'accept' || v.comment.length > 0, { message: 'Say why the value is rejected', path: ['comment'] })
export type AttachmentReviewRequest = z.infer<typeof attachmentReviewSchema>

export const attachmentCommentSchema = z.object({
  body: z.string().trim().min(1, 'Write a comment').max(4000, 'Use at most 4000 characters'),
})

/** Mail about proposed values (reviewers and admins, every record): each proposal, one daily digest, or none. */
export const PROPOSAL_MAIL_MODES = ['each', 'digest', 'none'] as const
export type ProposalMailMode = (typeof PROPOSAL_MAIL_MODES)[number]
export const PROPOSAL_MAIL_MODE_LABELS: Record<ProposalMailMode, string> = {
  each: 'A mail for each proposed value',
  digest: 'One daily digest of the values proposed since the last one',
  none: 'No mail (I use the review queue)',
}

/** Switchable record mails (on/off). */
export const RECORD_MAIL_KINDS = ['decisions', 'comments'] as const
export type RecordMailKind = (typeof RECORD_MAIL_KINDS)[number]
export const RECORD_MAIL_KIND_LABELS: Record<RecordMailKind, string> = {
  decisions: 'Decisions on values I proposed',
  comments: 'Comments on values on records I follow',
}
export const recordMailPreferencesSchema = z.object({
  // `true` / `false` (the earlier on/off switch) still mean each / none.
  proposals: z.union([z.enum(PROPOSAL_MAIL_MODES), z.boolean().transform(b => (b ? 'each' : 'none') as ProposalMailMode)], { message: 'Choose each, digest or none' }),
  decisions: z.boolean(),
  comments: z.boolean(),
}).partial().refine(v => Object.keys(v).length > 0, 'Change at least one preference')
export type RecordMailPreferences = { proposals: ProposalMailMode, decisions: boolean, comments: boolean }

/** One decision of a bulk review. */
export const reviewDecisionSchema = z.object({
  attachmentId: z.number({ message: 'Give the attachment id' }).int().positive(),
  decision: z.enum(['accept', 'reject'], { message: 'Decide accept or reject' }),
}).strict()

/**
 * `POST /api/reviews`: several decisions with one comment (needed when anything is rejected). Each
 * value is decided on its own: the caller's own proposals, unknown ids and values already decided
 * are refused one by one with the reason, the rest go through.
 */
export const reviewBulkSchema = z.object({
  decisions: z.array(reviewDecisionSchema).min(1, 'Give at least one decision').max(200, 'At most 200 decisions per request')
    .refine(d => new Set(d.map(x => x.attachmentId)).size === d.length, 'Each attachment once'),
  comment: z.string().trim().max(4000, 'Use at most 4000 characters').default(''),
}).strict().refine(v => v.comment.length > 0 || v.decisions.every(d => d.decision === 'accept'), { message: 'Say why values are rejected', path: ['comment'] })
export type ReviewBulkRequest = z.infer<typeof reviewBulkSchema>

/** Age filters of the review queue, by the time a value has waited since it was proposed. */
export const REVIEW_AGES = ['day', 'week', 'older-than-week', 'older-than-month'] as const
export type ReviewAge = (typeof REVIEW_AGES)[number]
export const REVIEW_AGE_LABELS: Record<ReviewAge, string> = {
  'day': 'proposed in the last 24 h',
  'week': 'proposed in the last 7 days',
  'older-than-week': 'waiting more than 7 days',
  'older-than-month': 'waiting more than 30 days',
}

/** `GET /api/reviews`: values awaiting the caller's review, oldest first. */
export const reviewQueueQuerySchema = z.object({
  record: z.coerce.number().int().positive().optional(),
  quantity: z.string().max(80).refine(k => !!quantityDef(k), { message: 'Unknown quantity' }).optional(),
  proposer: z.coerce.number().int().positive().optional(),
  age: z.enum(REVIEW_AGES).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
  offset: z.coerce.number().int().min(0).default(0),
})
export type ReviewQueueQuery = z.infer<typeof reviewQueueQuerySchema>
