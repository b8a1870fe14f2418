import type { H3Event } from 'h3'
import { and, eq, isNull } from 'drizzle-orm'
import { type Role, roleSatisfies } from '#shared/types/roles'

/** The member behind a request, read from the database on every request. */
export interface Actor {
  id: number
  email: string
  name: string
  role: Role
  via: 'session' | 'token'
  tokenId?: number
  /** Sign-in time of the session (ms since 1970); sessions only. */
  signedInAt?: number
}

/**
 * Authenticates a request: a personal API token (`Authorization: Bearer …`) or the sealed session
 * cookie, which holds only the member's id, display name and sign-in time. Role, active flag and
 * the last password change come from the database each time, so a demotion, deactivation or
 * password reset applies at once.
 * @throws 401 when nobody is signed in, the token is unknown or revoked, the member is deactivated,
 *   or the session was signed in before the member's password last changed.
 */
export async function requireActor(event: H3Event): Promise<Actor> {
  if (event.context.actor) return event.context.actor as Actor
  const db = useDB()
  const header = getRequestHeader(event, 'authorization')
  let actor: Actor | undefined
  if (header?.toLowerCase().startsWith('bearer ')) {
    const hash = hashToken(header.slice(7).trim())
    const row = await db.select({ user: schema.users, tokenId: schema.apiTokens.id })
      .from(schema.apiTokens)
      .innerJoin(schema.users, eq(schema.users.id, schema.apiTokens.userId))
      .where(and(eq(schema.apiTokens.tokenHash, hash), isNull(schema.apiTokens.revokedAt)))
      .get()
    if (!row || !row.user.active) throw createError({ status: 401, statusText: 'Unauthorized', message: 'Unknown, revoked or deactivated API token' })
    await db.update(schema.apiTokens).set({ lastUsedAt: new Date() }).where(eq(schema.apiTokens.id, row.tokenId))
    actor = { id: row.user.id, email: row.user.email, name: row.user.name, role: row.user.role, via: 'token', tokenId: row.tokenId }
  }
  else {
    const session = await getUserSession(event)
    const id = session.user?.id
    if (typeof id !== 'number') throw createError({ status: 401, statusText: 'Unauthorized', message: 'Sign in first' })
    const user = await db.select().from(schema.users).where(eq(schema.users.id, id)).get()
    if (!user || !user.active) {
      await clearUserSession(event)
      throw createError({ status: 401, statusText: 'Unauthorized', message: 'This account is not active' })
    }
    // A session without a sign-in time predates this check: it counts as signed in at time 0.
    const signedInAt = typeof session.user?.signedInAt === 'number' ? session.user.signedInAt : 0
    if (user.credentialsChangedAt && signedInAt < user.credentialsChangedAt.getTime()) {
      await clearUserSession(event)
      throw createError({ status: 401, statusText: 'Unauthorized', message: 'The password has changed since this session signed in: sign in again' })
    }
    actor = { id: user.id, email: user.email, name: user.name, role: user.role, via: 'session', signedInAt }
  }
  event.context.actor = actor
  return actor
}

/**
 * Authenticates, then authorizes: the member must hold `required`, or one of the roles listed
 * (admins pass every check; `viewer` means any signed-in member). Call it first in every handler,
 * before reading a body.
 * @throws 401 (not signed in) or 403 (signed in, role not allowed).
 */
export async function requireRole(event: H3Event, required: Role | readonly Role[]): Promise<Actor> {
  const actor = await requireActor(event)
  if (!roleSatisfies(actor.role, required)) {
    const needed = typeof required === 'string' ? `the ${required} role` : `one of the roles ${required.join(', ')}`
    throw createError({ status: 403, statusText: 'Forbidden', message: `This needs ${needed}` })
  }
  return actor
}

/**
 * Writes the session cookie: the member's id, display name and sign-in time, nothing else.
 * @param signedInAt sign-in time (ms since 1970); default now. Pass the current session's time to
 *   rewrite the cookie without extending what a later password change revokes.
 */
export async function startSession(event: H3Event, user: { id: number, name: string }, signedInAt = Date.now()) {
  await replaceUserSession(event, { user: { id: user.id, name: user.name, signedInAt } })
}
