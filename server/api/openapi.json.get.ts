/**
 * The API description (OpenAPI 3.1), public. Assembled from the documents in server/openapi/
 * (one per area), so each area documents its own routes.
 */
import type { OpenApiDocument } from '#shared/types/openapi'

export default defineEventHandler(async (): Promise<OpenApiDocument> => {
  const storage = useStorage('assets:openapi')
  const keys = (await storage.getKeys()).filter(k => k.endsWith('.json')).sort()
  const parts = await Promise.all(keys.map(async k => (await storage.getItem(k)) as { paths?: Record<string, unknown>, components?: { schemas?: Record<string, unknown> } }))
  const core = parts.find((_, i) => keys[i] === 'core.json') ?? {}
  const doc = structuredClone(core) as Record<string, any>
  for (const [i, part] of parts.entries()) {
    if (keys[i] === 'core.json') continue
    Object.assign(doc.paths ??= {}, part.paths)
    Object.assign((doc.components ??= {}).schemas ??= {}, part.components?.schemas)
  }
  return doc as OpenApiDocument
})
