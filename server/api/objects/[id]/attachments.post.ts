import { idParamSchema } from '#shared/types/account'
import { attachSchema } from '#shared/types/records'

/**
 * Propose derived values for a record (analyst): `{ lobe | study, subject, quantities, note? }`.
 * The subject (what the values describe) has no default: a request without it answers 422 naming
 * `subject`. Answers 201 `{ items }`, each with its subject warning (or null). See `proposeValues`.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const { id } = paramsAs(event, idParamSchema)
  const body = await readBodyAs(event, attachSchema)
  const result = await proposeValues(event, actor, id, body)
  setResponseStatus(event, 201)
  return result
})
