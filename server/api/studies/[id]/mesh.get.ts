import { createReadStream, existsSync, statSync } from 'node:fs'
import { idParamSchema } from '#shared/types/account'

/** The merged body's display mesh (contact frame), `ISTHMF32` binary, cached by result key. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const { study } = await loadStudy(useDB(), id)
  const path = studyMeshPaths(study.cacheKey).display
  if (study.status !== 'done' || !existsSync(path)) throw notFound('Merged-body mesh')
  const etag = `"${study.cacheKey}-union"`
  setResponseHeaders(event, { 'etag': etag, 'cache-control': 'private, max-age=0, must-revalidate', 'content-type': 'application/octet-stream' })
  if (getRequestHeader(event, 'if-none-match') === etag) {
    setResponseStatus(event, 304)
    return null
  }
  setResponseHeader(event, 'content-length', statSync(path).size)
  return sendStream(event, createReadStream(path))
})
