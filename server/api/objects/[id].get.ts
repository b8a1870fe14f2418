import { idParamSchema } from '#shared/types/account'

/** One record as the record page shows it: links, current values, every attachment, comment threads, history. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const data = await loadRecord(useDB(), id, actor.id)
  if (!data) throw recordNotFound()
  return data
})
