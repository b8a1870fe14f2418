import { idParamSchema } from '#shared/types/account'

/** A study: `{ status, progress, stage, error, result, ... }` (result in SI, contact frame). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const row = await loadStudy(useDB(), id)
  return studyView(row.study, { a: row.a, b: row.b }, row.ownerName)
})
