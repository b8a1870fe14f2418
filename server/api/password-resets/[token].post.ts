import { and, eq, isNull } from 'drizzle-orm'
import { resetCompleteSchema, tokenParamSchema } from '#shared/types/account'

/**
 * Set a new password with a reset link; the link works once, ends every session of the member and
 * revokes the member's API tokens (whoever prompted the reset may hold one).
 */
export default defineEventHandler(async (event) => {
  const { token } = paramsAs(event, tokenParamSchema)
  const { password } = await readBodyAs(event, resetCompleteSchema)
  const db = useDB()
  const row = await findPendingReset(db, token)
  if (!row) throw linkGone('password-reset')
  const passwordHash = await hashPassword(password)
  const done = await db.transaction(async (tx) => {
    const claimed = await tx.update(schema.passwordResets).set({ usedAt: new Date() })
      .where(and(eq(schema.passwordResets.id, row.id), isNull(schema.passwordResets.usedAt))).returning({ id: schema.passwordResets.id })
    if (!claimed.length) return false
    await tx.update(schema.users).set({ passwordHash, credentialsChangedAt: new Date() }).where(eq(schema.users.id, row.userId))
    await endSessions(tx, row.userId)
    await revokeTokens(tx, row.userId)
    await audit(event, { actorId: row.userId, action: 'password-reset.completed', subjectType: 'password_reset', subjectId: row.id }, tx)
    return true
  })
  if (!done) throw linkGone('password-reset')
  await clearSigninFailures(`account:${(await db.select({ email: schema.users.email }).from(schema.users).where(eq(schema.users.id, row.userId)).get())?.email}`)
  return { ok: true }
})
