import { and, eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/** Stop following a record. Idempotent. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const db = useDB()
  const record = await db.select({ id: schema.objects.id }).from(schema.objects).where(eq(schema.objects.id, id)).get()
  if (!record) throw recordNotFound()
  await db.delete(schema.objectFollows).where(and(eq(schema.objectFollows.objectId, id), eq(schema.objectFollows.userId, actor.id)))
  return { following: false }
})
