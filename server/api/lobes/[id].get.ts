import { idParamSchema } from '#shared/types/account'

/** One lobe with its properties (SI), validation report and surface-field job state. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  return (await loadLobeView(useDB(), id)).view
})
