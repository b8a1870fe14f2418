import { existsSync } from 'node:fs'
import { idParamSchema } from '#shared/types/account'

/** The merged body's display mesh (contact frame), `ISTHMF32` binary, cached by result key. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const { study } = await loadStudy(useDB(), id)
  const path = studyMeshPaths(study.cacheKey).display
  if (study.status !== 'done' || !existsSync(path)) throw notFound('Merged-body mesh')
  return sendBinaryFile(event, path, `"${study.cacheKey}-union"`)
})
