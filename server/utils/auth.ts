import type { H3Event } from 'h3'
import { and, eq, isNull, lt, or, sql } from 'drizzle-orm'
import { type Role, roleSatisfies } from '#shared/types/roles'

/** Name of the session cookie (nuxt-auth-utils' default, not changed in nuxt.config). */
const SESSION_COOKIE = 'nuxt-session'

/** A token's `lastUsedAt` is written at most this often (ms): scripted reads cost no write each. */
export const TOKEN_LAST_USED_RESOLUTION_MS = 60_000

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
  /** The member's session version the cookie carries; sessions only. */
  sessionVersion?: number
}

/**
 * Authenticates a request: a personal API token (`Authorization: Bearer …`) or the sealed session
 * cookie, which holds only the member's id, display name, sign-in time and session version. Role,
 * active flag and the member's current session version come from the database each time, so a
 * demotion, deactivation, sign-out or password change/reset applies at once: a cookie whose version
 * is not the member's current one is refused (the cookie alone cannot end a session, the server can).
 * A token's `lastUsedAt` is written at most once a minute.
 * @throws 401 when nobody is signed in, the token is unknown or revoked, the member is deactivated,
 *   or the session's version is no longer the member's.
 */
export async function requireActor(event: H3Event): Promise<Actor> {
  if (event.context.actor) return event.context.actor as Actor
  const db = useDB()
  const header = getRequestHeader(event, 'authorization')
  let actor: Actor | undefined
  if (header?.toLowerCase().startsWith('bearer ')) {
    const hash = hashToken(header.slice(7).trim())
    const row = await db.select({ user: schema.users, tokenId: schema.apiTokens.id, lastUsedAt: schema.apiTokens.lastUsedAt })
      .from(schema.apiTokens)
      .innerJoin(schema.users, eq(schema.users.id, schema.apiTokens.userId))
      .where(and(eq(schema.apiTokens.tokenHash, hash), isNull(schema.apiTokens.revokedAt)))
      .get()
    if (!row || !row.user.active) throw createError({ status: 401, statusText: 'Unauthorized', message: 'Unknown, revoked or deactivated API token' })
    const now = Date.now()
    if (!row.lastUsedAt || now - row.lastUsedAt.getTime() >= TOKEN_LAST_USED_RESOLUTION_MS) {
      // Conditional, so parallel requests that all saw an old time still write once.
      const t = schema.apiTokens
      await db.update(t).set({ lastUsedAt: new Date(now) })
        .where(and(eq(t.id, row.tokenId), or(isNull(t.lastUsedAt), lt(t.lastUsedAt, new Date(now - TOKEN_LAST_USED_RESOLUTION_MS)))))
    }
    actor = { id: row.user.id, email: row.user.email, name: row.user.name, role: row.user.role, via: 'token', tokenId: row.tokenId }
  }
  else {
    const session = await sessionOf(event)
    const id = session.user?.id
    if (typeof id !== 'number') throw createError({ status: 401, statusText: 'Unauthorized', message: 'Sign in first' })
    const user = await db.select().from(schema.users).where(eq(schema.users.id, id)).get()
    if (!user || !user.active) {
      await endSessionCookie(event)
      throw createError({ status: 401, statusText: 'Unauthorized', message: 'This account is not active' })
    }
    // A session without a sign-in time or version predates these checks: time 0, version −1 (refused).
    const signedInAt = typeof session.user?.signedInAt === 'number' ? session.user.signedInAt : 0
    const version = typeof session.user?.sv === 'number' ? session.user.sv : -1
    if (version !== user.sessionVersion || (user.credentialsChangedAt && signedInAt < user.credentialsChangedAt.getTime())) {
      await endSessionCookie(event)
      throw createError({ status: 401, statusText: 'Unauthorized', message: 'This session has ended (signed out, or the password changed): sign in again' })
    }
    actor = { id: user.id, email: user.email, name: user.name, role: user.role, via: 'session', signedInAt, sessionVersion: user.sessionVersion }
  }
  event.context.actor = actor
  return actor
}

/** Unsealed session cookies by their sealed text: unsealing costs a key derivation, an HMAC and a decryption. */
const unsealed = new Map<string, { user?: import('#auth-utils').User, at: number }>()
const UNSEALED_MAX = 5000
/** How long an unsealed cookie is reused (ms). Revocation does not depend on it: the session version is read each time. */
const UNSEALED_TTL_MS = 60_000

/**
 * The session cookie's content, unsealed once per distinct cookie and then reused for a minute
 * (a page rendered on the server asks the API several times with the same cookie). The sealed
 * text is integrity-protected, so the same text always holds the same content; whether the session
 * still counts is decided afterwards against the database, never by this cache.
 */
async function sessionOf(event: H3Event): Promise<{ user?: import('#auth-utils').User }> {
  const sealed = getCookie(event, SESSION_COOKIE)
  if (!sealed) return getUserSession(event)
  const now = Date.now()
  const hit = unsealed.get(sealed)
  if (hit && now - hit.at < UNSEALED_TTL_MS) return hit
  const session = await getUserSession(event)
  if (unsealed.size >= UNSEALED_MAX) {
    for (const [k, v] of unsealed) if (now - v.at >= UNSEALED_TTL_MS || unsealed.size >= UNSEALED_MAX) unsealed.delete(k)
  }
  unsealed.set(sealed, { user: session.user, at: now })
  return session
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
 * Writes the session cookie: the member's id, display name, sign-in time and session version,
 * nothing else.
 * @param user the member as stored (its `sessionVersion` is the one the cookie will carry).
 * @param signedInAt sign-in time (ms since 1970); default now. Pass the current session's time to
 *   rewrite the cookie without extending what a later password change revokes.
 */
export async function startSession(event: H3Event, user: { id: number, name: string, sessionVersion: number }, signedInAt = Date.now()) {
  await replaceUserSession(event, { user: { id: user.id, name: user.name, signedInAt, sv: user.sessionVersion } }, sessionCookieConfig(event))
}

/** Removes the session cookie from the browser (the server-side end is `endSessions`). */
export async function endSessionCookie(event: H3Event) {
  await clearUserSession(event, sessionCookieConfig(event))
}

/**
 * Ends every session of a member at once (sign-out, password change or reset, deactivation): the
 * member's session version moves on, so every cookie carrying the old one is refused.
 * @param db the database or an open transaction.
 * @returns the new version.
 */
export async function endSessions(db: Pick<ReturnType<typeof useDB>, 'update'>, userId: number): Promise<number> {
  const [row] = await db.update(schema.users).set({ sessionVersion: sql`${schema.users.sessionVersion} + 1` })
    .where(eq(schema.users.id, userId)).returning({ v: schema.users.sessionVersion })
  return row?.v ?? 0
}

/** Revokes every live API token of a member (deactivation, password reset). */
export async function revokeTokens(db: Pick<ReturnType<typeof useDB>, 'update'>, userId: number) {
  const t = schema.apiTokens
  await db.update(t).set({ revokedAt: new Date() }).where(and(eq(t.userId, userId), isNull(t.revokedAt)))
}

const LOOPBACK_HOSTS = new Set(['localhost', '127.0.0.1', '[::1]', '::1'])

/**
 * Whether the session cookie is marked `Secure` (ISTHMUS_COOKIE_SECURE): with 'auto', when the public
 * URL is https, the request came over https (the proxy's `X-Forwarded-Proto` counts only with
 * ISTHMUS_TRUST_PROXY=1), or the request's host is loopback (browsers keep Secure cookies there
 * even over http). A plain-HTTP LAN address gets no Secure flag, or the browser would drop it.
 */
export function cookieIsSecure(event: H3Event): boolean {
  const { cookieSecure, publicUrl, trustProxy } = useConfig()
  if (cookieSecure !== 'auto') return cookieSecure === 'always'
  if (publicUrl.startsWith('https:')) return true
  if (getRequestProtocol(event, { xForwardedProto: trustProxy }) === 'https') return true
  const host = getRequestHost(event, { xForwardedHost: false }).replace(/:\d+$/, '').toLowerCase()
  return LOOPBACK_HOSTS.has(host)
}

function sessionCookieConfig(event: H3Event) {
  return { cookie: { secure: cookieIsSecure(event) } }
}
