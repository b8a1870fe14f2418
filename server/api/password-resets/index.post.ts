import type { H3Event } from 'h3'
import { eq } from 'drizzle-orm'
import { resetRequestSchema } from '#shared/types/account'

/**
 * Ask for a password-reset link by e-mail. Always 202 with the same answer, at once, whether or not
 * the address belongs to a member (no enumeration, not even by timing): the member lookup and the
 * mail run after the answer, and only active members get a mail. Requests are throttled per
 * address and per client address (429 with `Retry-After`), the same for members and strangers.
 */
export default defineEventHandler(async (event) => {
  const { email } = await readBodyAs(event, resetRequestSchema)
  const { passwordResetMaxPerAddress, passwordResetMaxPerIp, passwordResetWindowMs } = useConfig()
  await takeAttempt(event, [
    { key: `reset:${email}`, max: passwordResetMaxPerAddress },
    { key: `reset-ip:${clientIp(event)}`, max: passwordResetMaxPerIp },
  ], passwordResetWindowMs, 'password-reset requests')
  event.waitUntil(sendResetLink(event, email))
  setResponseStatus(event, 202)
  return { ok: true, message: 'If this address belongs to an active member, a reset link is on its way.' }
})

/** Runs after the answer: never rejects; a failed mail is logged and audited. */
async function sendResetLink(event: H3Event, email: string) {
  let userId: number | null = null
  try {
    const db = useDB()
    await pruneAttempts('reset', useConfig().passwordResetWindowMs)
    const user = await db.select().from(schema.users).where(eq(schema.users.email, email)).get()
    if (!user?.active) return
    userId = user.id
    const token = newToken()
    const expiresAt = new Date(Date.now() + useConfig().passwordResetTtlMs)
    const [row] = await db.insert(schema.passwordResets).values({ userId: user.id, tokenHash: hashToken(token), expiresAt }).returning()
    await sendMail({ to: user.email, ...passwordResetMail({ link: publicLink(`/reset/${token}`), expiresAt }) })
    await audit(event, { actorId: user.id, action: 'password-reset.requested', subjectType: 'password_reset', subjectId: row!.id })
  }
  catch (error) {
    const message = error instanceof Error ? error.message : String(error)
    console.error(`[isthmus] password-reset mail${userId === null ? '' : ` to member #${userId}`} failed:`, message)
    await audit(event, { actorId: userId, action: 'password-reset.mail-failed', subjectType: 'user', subjectId: userId ?? undefined, detail: { error: message.slice(0, 300) } })
      .catch(e => console.error('[isthmus] could not audit a failed mail:', e))
  }
}
