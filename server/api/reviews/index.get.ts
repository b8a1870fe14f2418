import { reviewQueueQuerySchema } from '#shared/types/records'

/**
 * The review queue (reviewer): proposed values the caller may decide — every record, not their own
 * proposals — oldest first, filtered by `record`, `quantity`, `proposer` and `age`, paged with
 * `limit`/`offset`. Each item carries its record's designation, its subject and subject warning,
 * and the hours it has waited; `filters` lists the choices, `ownAwaiting` the caller's own values
 * waiting for someone else.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'reviewer')
  const query = queryAs(event, reviewQueueQuerySchema)
  return reviewQueue(useDB(), actor, query)
})
