import { idParamSchema } from '#shared/types/account'
import { attachmentReviewSchema } from '#shared/types/records'

/**
 * Accept or reject one proposed value (reviewer). Nobody accepts a value they proposed (403);
 * rejecting one's own proposal withdraws it. A value already decided answers 409. Several values
 * at once: `POST /api/reviews`.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'reviewer')
  const { id } = paramsAs(event, idParamSchema)
  const { decision, comment } = await readBodyAs(event, attachmentReviewSchema)
  const { results, views } = await decideValues(event, actor, [{ attachmentId: id, decision }], comment, { withdrawOwn: true })
  const result = results[0]!
  if (result.outcome === 'refused') {
    if (result.code === 'not-found') throw notFound('Attachment')
    if (result.code === 'own-proposal') throw createError({ status: 403, statusText: 'Forbidden', message: 'You proposed this value: another reviewer must accept it (you can reject it to withdraw it)' })
    throw recordConflict(result.reason)
  }
  return { attachment: views.get(id)!, superseded: result.superseded }
})
