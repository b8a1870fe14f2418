import { passwordChangeSchema } from '#shared/types/account'
import { eq } from 'drizzle-orm'

/**
 * Change one's password; the current one is required. Every other session of the member is signed
 * out; the session making the change is re-issued and stays signed in.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const { currentPassword, newPassword } = await readBodyAs(event, passwordChangeSchema)
  const db = useDB()
  const user = await db.select().from(schema.users).where(eq(schema.users.id, actor.id)).get()
  if (!user) throw notFound('Account')
  if (!(await verifyPassword(user.passwordHash, currentPassword))) {
    throw unprocessable('The current password is not right', [{ path: 'currentPassword', message: 'not right' }])
  }
  const passwordHash = await hashPassword(newPassword)
  const changedAt = new Date()
  await db.transaction(async (tx) => {
    await tx.update(schema.users).set({ passwordHash, credentialsChangedAt: changedAt }).where(eq(schema.users.id, actor.id))
    await audit(event, { actorId: actor.id, action: 'account.password-changed', subjectType: 'user', subjectId: actor.id }, tx)
  })
  if (actor.via === 'session') await startSession(event, user, changedAt.getTime())
  return { ok: true }
})
