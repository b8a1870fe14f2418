import { passwordChangeSchema } from '#shared/types/account'
import { eq } from 'drizzle-orm'

/**
 * Change one's password; the current one is required, and checked through the same throttle as
 * sign-in (429 with `Retry-After` during its back-off), so a stolen cookie cannot guess it. Every
 * session of the member ends (the session version moves on); the session making the change is
 * re-issued under the new version and stays signed in.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const { currentPassword, newPassword } = await readBodyAs(event, passwordChangeSchema)
  const db = useDB()
  const user = await db.select().from(schema.users).where(eq(schema.users.id, actor.id)).get()
  if (!user) throw notFound('Account')
  if (!(await throttledPasswordCheck(event, user.email, () => verifyPassword(user.passwordHash, currentPassword)))) {
    throw unprocessable('The current password is not right', [{ path: 'currentPassword', message: 'not right' }])
  }
  const passwordHash = await hashPassword(newPassword)
  const changedAt = new Date()
  const version = await db.transaction(async (tx) => {
    await tx.update(schema.users).set({ passwordHash, credentialsChangedAt: changedAt }).where(eq(schema.users.id, actor.id))
    const v = await endSessions(tx, actor.id)
    await audit(event, { actorId: actor.id, action: 'account.password-changed', subjectType: 'user', subjectId: actor.id }, tx)
    return v
  })
  if (actor.via === 'session') await startSession(event, { ...user, sessionVersion: version }, changedAt.getTime())
  return { ok: true }
})
