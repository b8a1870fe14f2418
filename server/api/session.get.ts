import { eq } from 'drizzle-orm'

/** The signed-in member (role read from the database), or `{ user: null }`. */
export default defineEventHandler(async (event) => {
  try {
    const actor = await requireActor(event)
    const user = await useDB().select().from(schema.users).where(eq(schema.users.id, actor.id)).get()
    return { user: user ? memberView(user) : null }
  }
  catch (error) {
    if ((error as { statusCode?: number }).statusCode === 401) return { user: null }
    throw error
  }
})
