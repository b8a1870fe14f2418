import { signInSchema } from '#shared/types/account'
import { eq } from 'drizzle-orm'

// A hash of a password nobody has, verified when the e-mail is unknown so both paths cost the same.
let decoyHash: Promise<string> | undefined

/** Sign in with e-mail and password → 200 + session cookie; 401 (generic) on bad credentials. */
export default defineEventHandler(async (event) => {
  const { email, password } = await readBodyAs(event, signInSchema)
  const ip = clientIp(event)
  const accountKey = `account:${email}`
  // Charged before the (slow) password check, so parallel guesses cannot all slip under the limit.
  const attempt = await takeSigninAttempt(event, accountKey, `ip:${ip}`)
  const db = useDB()
  const user = await db.select().from(schema.users).where(eq(schema.users.email, email)).get()
  decoyHash ??= hashPassword(newToken())
  const ok = user ? await verifyPassword(user.passwordHash, password) : (await verifyPassword(await decoyHash, password), false)
  if (!user || !ok || !user.active) {
    await pruneSigninFailures()
    await audit(event, { actorId: user?.id ?? null, action: 'session.failed', detail: { email } })
    throw createError({ status: 401, statusText: 'Unauthorized', message: 'E-mail or password is not right, or the account is not active' })
  }
  await releaseAttempt(attempt)
  await clearSigninFailures(accountKey)
  const [signedIn] = await db.update(schema.users).set({ lastSignInAt: new Date() }).where(eq(schema.users.id, user.id)).returning()
  await startSession(event, user)
  await audit(event, { actorId: user.id, action: 'session.signed-in' })
  return { user: memberView(signedIn ?? user) }
})
