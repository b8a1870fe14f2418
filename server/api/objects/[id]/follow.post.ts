import { eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/** Follow a record: mails about its proposals and comments (as set in Account → Record mails). Idempotent. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const db = useDB()
  const record = await db.select({ id: schema.objects.id }).from(schema.objects).where(eq(schema.objects.id, id)).get()
  if (!record) throw recordNotFound()
  await db.insert(schema.objectFollows).values({ objectId: id, userId: actor.id }).onConflictDoNothing()
  return { following: true }
})
