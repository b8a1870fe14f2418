import type { H3Event } from 'h3'
import { and, eq, gte, inArray, like, lt, sql } from 'drizzle-orm'

/** One counter to charge: its key (`account:…`, `ip:…`, `reset-ip:…`) and the attempts it allows per window. */
export interface RateLimitKey {
  key: string
  max: number
}

/**
 * Charges one attempt to every key before the guarded work runs, so parallel requests cannot all
 * pass a check that runs before their outcome is known. One row per key is inserted first, then
 * the rows in the window are counted, the new one included: SQLite writes one at a time, so the
 * last of any group of passing attempts counts every earlier one, and at most `max` pass however
 * many arrive together. Kept in the database so the limit survives restarts and holds across
 * server processes sharing one database.
 * An attempt over the limit removes its own rows again (a refused attempt costs nothing) and fails.
 * @param windowMs length of the sliding window, in milliseconds.
 * @param what what is being limited, for the error message ("failed sign-ins").
 * @returns the ids of the inserted rows: leave them to count as a failure, or pass them to
 *   `releaseAttempt` when the attempt should not count (a successful sign-in).
 * @throws 429 with `Retry-After` (seconds) when any key is over its limit.
 */
export async function takeAttempt(event: H3Event, keys: RateLimitKey[], windowMs: number, what: string): Promise<number[]> {
  const db = useDB()
  const t = schema.signinFailures
  const now = Date.now()
  const inserted = await db.insert(t).values(keys.map(k => ({ key: k.key, at: new Date(now) }))).returning({ id: t.id })
  const ids = inserted.map(r => r.id)
  const rows = await db.select({ key: t.key, n: sql<number>`count(*)`, oldest: sql<number>`min(${t.at})` })
    .from(t)
    .where(and(inArray(t.key, keys.map(k => k.key)), gte(t.at, new Date(now - windowMs))))
    .groupBy(t.key)
  const limits = new Map(keys.map(k => [k.key, k.max]))
  const over = rows.filter(r => Number(r.n) > (limits.get(r.key) ?? 0))
  if (!over.length) return ids
  await releaseAttempt(ids)
  const retryMs = Math.max(...over.map(r => Number(r.oldest) + windowMs - Date.now()))
  const retryAfter = Math.max(1, Math.ceil(retryMs / 1000))
  setResponseHeader(event, 'Retry-After', retryAfter)
  throw createError({
    status: 429,
    statusText: 'Too Many Requests',
    message: `Too many ${what}. Try again in ${retryAfter} s.`,
    data: { retryAfterSeconds: retryAfter },
  })
}

/** Takes back attempts charged by `takeAttempt` (their rows are deleted). */
export async function releaseAttempt(ids: number[]) {
  if (ids.length) await useDB().delete(schema.signinFailures).where(inArray(schema.signinFailures.id, ids))
}

/** Deletes rows under `prefix` older than two windows: they no longer count. */
export async function pruneAttempts(prefix: string, windowMs: number) {
  const t = schema.signinFailures
  await useDB().delete(t).where(and(like(t.key, `${prefix}%`), lt(t.at, new Date(Date.now() - 2 * windowMs))))
}

/**
 * Sign-in throttling: at most `signinMaxFailures` failed attempts per account and
 * `signinMaxFailuresPerIp` per client address within `signinWindowMs`. The attempt is charged
 * before the password is checked (see `takeAttempt`); a failure simply leaves it counted.
 * @returns the attempt's row ids, for `releaseAttempt` after a successful sign-in.
 * @throws 429 with `Retry-After` (seconds) when either key is over the limit.
 */
export async function takeSigninAttempt(event: H3Event, accountKey: string, ipKey: string): Promise<number[]> {
  const { signinMaxFailures, signinMaxFailuresPerIp, signinWindowMs } = useConfig()
  return takeAttempt(event, [{ key: accountKey, max: signinMaxFailures }, { key: ipKey, max: signinMaxFailuresPerIp }], signinWindowMs, 'failed sign-ins')
}

/** After a failed sign-in: drops rows too old to count. The failure itself stays charged. */
export async function pruneSigninFailures() {
  const { signinWindowMs } = useConfig()
  await pruneAttempts('account:', signinWindowMs)
  await pruneAttempts('ip:', signinWindowMs)
}

export async function clearSigninFailures(key: string) {
  await useDB().delete(schema.signinFailures).where(eq(schema.signinFailures.key, key))
}
