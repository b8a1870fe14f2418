import { idParamSchema } from '#shared/types/account'

/** The merged body's display mesh (contact frame), `ISTHMF32` binary, cached by result key. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const { study } = await loadStudy(useDB(), id)
  const key = studyMeshKeys(study.cacheKey).display
  if (study.status !== 'done' || !(await (await useMeshStore()).exists(key))) throw notFound('Merged-body mesh')
  return sendBinaryFile(event, key, `"${study.cacheKey}-union"`)
})
