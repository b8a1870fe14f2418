import { createReadStream, existsSync, statSync } from 'node:fs'
import { eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/**
 * The lobe's display mesh (simplified to at most ISTHMUS_DISPLAY_FACES faces; analysis always uses
 * the full mesh) in the compact `ISTHMF32` binary form (shared/utils/mesh-binary.ts), cached by
 * content hash: a matching If-None-Match answers 304.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const lobe = await useDB().select({ sha256: schema.lobes.sha256, units: schema.lobes.units }).from(schema.lobes).where(eq(schema.lobes.id, id)).get()
  if (!lobe) throw notFound('Lobe')
  const path = derivedMeshPaths(lobe.sha256, lobe.units).display
  if (!existsSync(path)) throw notFound('Display mesh')
  const etag = `"${lobe.sha256}-${lobe.units}-display"`
  setResponseHeaders(event, { 'etag': etag, 'cache-control': 'private, max-age=0, must-revalidate', 'content-type': 'application/octet-stream' })
  if (getRequestHeader(event, 'if-none-match') === etag) {
    setResponseStatus(event, 304)
    return null
  }
  setResponseHeader(event, 'content-length', statSync(path).size)
  return sendStream(event, createReadStream(path))
})
