import { eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/**
 * The lobe's display mesh (simplified to at most ISTHMUS_DISPLAY_FACES faces; analysis always uses
 * the full mesh) in the compact `ISTHMF32` binary form (shared/utils/mesh-binary.ts), cached by
 * content hash: a matching If-None-Match answers 304. Prepared in the background after an upload;
 * a request that arrives before it is ready waits for it.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const lobe = await useDB().select({ sha256: schema.lobes.sha256, units: schema.lobes.units }).from(schema.lobes).where(eq(schema.lobes.id, id)).get()
  if (!lobe) throw notFound('Lobe')
  return sendBinaryFile(event, await ensureDisplayMesh(lobe.sha256, lobe.units), `"${lobe.sha256}-${lobe.units}-display"`)
})
