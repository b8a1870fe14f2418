import { eq } from 'drizzle-orm'

/** Which record mails the signed-in member gets (no stored row = all on). */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const row = await useDB().select().from(schema.mailPreferences).where(eq(schema.mailPreferences.userId, actor.id)).get()
  return { proposals: row?.proposals ?? true, decisions: row?.decisions ?? true, comments: row?.comments ?? true }
})
