import { reviewBulkSchema } from '#shared/types/records'

/**
 * Bulk review (reviewer): `{ decisions: [{ attachmentId, decision: 'accept' | 'reject' }], comment }`
 * — one comment for all, needed when anything is rejected. Each value is decided on its own (four
 * eyes per value): the caller's own proposals, unknown ids and values already decided are refused
 * one by one with the reason while the others go through. Answers 200 with `results` in request
 * order and the counts.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'reviewer')
  const { decisions, comment } = await readBodyAs(event, reviewBulkSchema)
  const { results } = await decideValues(event, actor, decisions, comment)
  const count = (o: string) => results.filter(r => r.outcome === o).length
  return { results, accepted: count('accepted'), rejected: count('rejected'), refused: count('refused') }
})
