import { eq } from 'drizzle-orm'

export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const user = await useDB().select().from(schema.users).where(eq(schema.users.id, actor.id)).get()
  if (!user) throw notFound('Account')
  return memberView(user)
})
