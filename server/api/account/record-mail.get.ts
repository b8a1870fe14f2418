import { eq } from 'drizzle-orm'

/** Which record mails the signed-in member gets: proposals `each` | `digest` | `none`, decisions and comments on/off. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  return recordMailPreferences(await useDB().select().from(schema.mailPreferences).where(eq(schema.mailPreferences.userId, actor.id)).get())
})
