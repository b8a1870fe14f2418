import { eq } from 'drizzle-orm'

/**
 * Sign out (always succeeds). Ends the session on the server, not only in this browser: the member's
 * session version moves on, so this cookie, a saved copy of it, and the member's other sessions are
 * all refused from now on.
 */
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  await endSessionCookie(event)
  const id = session.user?.id
  if (typeof id === 'number') {
    const db = useDB()
    // Only a session still valid may end the others: a stale cookie cannot sign the member out again.
    const user = await db.select({ v: schema.users.sessionVersion }).from(schema.users).where(eq(schema.users.id, id)).get()
    if (user && user.v === session.user?.sv) {
      await endSessions(db, id)
      await audit(event, { actorId: id, action: 'session.signed-out' })
    }
  }
  return { ok: true }
})
