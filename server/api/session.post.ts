import { signInSchema } from '#shared/types/account'
import { eq } from 'drizzle-orm'

// A hash of a password nobody has, verified when the e-mail is unknown so both paths cost the same.
let decoyHash: Promise<string> | undefined

/**
 * Sign in with e-mail and password → 200 + session cookie; 401 (generic) on bad credentials; 429 with
 * `Retry-After` during the back-off that follows repeated failures (`throttledPasswordCheck`).
 */
export default defineEventHandler(async (event) => {
  const { email, password } = await readBodyAs(event, signInSchema)
  const db = useDB()
  const user = await db.select().from(schema.users).where(eq(schema.users.email, email)).get()
  decoyHash ??= hashPassword(newToken())
  const ok = await throttledPasswordCheck(event, email, async () =>
    user ? (await verifyPassword(user.passwordHash, password)) && user.active : (await verifyPassword(await decoyHash!, password), false))
  if (!user || !ok) {
    await audit(event, { actorId: user?.id ?? null, action: 'session.failed', detail: { email } })
    throw createError({ status: 401, statusText: 'Unauthorized', message: 'E-mail or password is not right, or the account is not active' })
  }
  const [signedIn] = await db.update(schema.users).set({ lastSignInAt: new Date() }).where(eq(schema.users.id, user.id)).returning()
  await startSession(event, signedIn ?? user)
  await audit(event, { actorId: user.id, action: 'session.signed-in' })
  return { user: memberView(signedIn ?? user) }
})
