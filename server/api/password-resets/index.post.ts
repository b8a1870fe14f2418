import { eq } from 'drizzle-orm'
import { resetRequestSchema } from '#shared/types/account'

/**
 * Ask for a password-reset link by e-mail. Always 202 with the same answer, whether or not the
 * address belongs to a member (no enumeration); the mail goes only to active members.
 */
export default defineEventHandler(async (event) => {
  const { email } = await readBodyAs(event, resetRequestSchema)
  const db = useDB()
  const user = await db.select().from(schema.users).where(eq(schema.users.email, email)).get()
  if (user?.active) {
    const token = newToken()
    const expiresAt = new Date(Date.now() + useConfig().passwordResetTtlMs)
    const [row] = await db.insert(schema.passwordResets).values({ userId: user.id, tokenHash: hashToken(token), expiresAt }).returning()
    await sendMail({ to: user.email, ...passwordResetMail({ link: publicLink(`/reset/${token}`), expiresAt }) })
    await audit(event, { actorId: user.id, action: 'password-reset.requested', subjectType: 'password_reset', subjectId: row!.id })
  }
  setResponseStatus(event, 202)
  return { ok: true, message: 'If this address belongs to an active member, a reset link is on its way.' }
})
