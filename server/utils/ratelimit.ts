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

/** One throttled key of a password check: failures allowed in the window, and its longest back-off. */
interface BackoffKey {
  key: string
  allowed: number
  maxWaitMs: number
}

/**
 * The one throttle every password check goes through (sign-in, the current password on a password
 * change). Failures are counted per account (`account:<e-mail>`) and per client address
 * (`ip:<address>`) within `signinWindowMs`. Up to the allowed number a key is free; past it the next
 * check must wait base × 2^(failures − allowed) after the key's last failure, capped per account
 * (`signinBackoffMaxMs`, short, so strangers guessing cannot keep the owner out for long) and per
 * address (`signinBackoffMaxMsPerIp`). There is no hard lockout: once the wait is over the right
 * password works, from anywhere. A check refused during a wait costs nothing and answers 429.
 *
 * The attempt is charged before the password is checked (one row per key, as `takeAttempt`), and
 * only rows inserted before it count towards its wait, so parallel guesses cannot all slip through:
 * of a burst, the ones past the allowed number find an earlier failure from that very moment.
 * @param check the password comparison (slow by design); runs only when no wait applies.
 * @returns whether the password was right. A right one takes back the attempt and clears the
 *   account's failures; a wrong one stays counted.
 * @throws 429 with `Retry-After` (seconds) and `data.retryAfterSeconds` while a wait applies.
 */
export async function throttledPasswordCheck(event: H3Event, email: string, check: () => Promise<boolean>): Promise<boolean> {
  const config = useConfig()
  const accountKey = `account:${email}`
  const keys: BackoffKey[] = [
    { key: accountKey, allowed: config.signinMaxFailures, maxWaitMs: config.signinBackoffMaxMs },
    { key: `ip:${clientIp(event)}`, allowed: config.signinMaxFailuresPerIp, maxWaitMs: config.signinBackoffMaxMsPerIp },
  ]
  const db = useDB()
  const t = schema.signinFailures
  const now = Date.now()
  const inserted = await db.insert(t).values(keys.map(k => ({ key: k.key, at: new Date(now) }))).returning({ id: t.id, key: t.key })
  const ids = inserted.map(r => r.id)
  let waitUntil = 0
  for (const k of keys) {
    const own = inserted.find(r => r.key === k.key)!.id
    const earlier = await db.select({ n: sql<number>`count(*)`, last: sql<number | null>`max(${t.at})` }).from(t)
      .where(and(eq(t.key, k.key), gte(t.at, new Date(now - config.signinWindowMs)), lt(t.id, own))).get()
    const n = Number(earlier?.n ?? 0)
    if (n < k.allowed || earlier?.last == null) continue
    const wait = Math.min(k.maxWaitMs, config.signinBackoffBaseMs * 2 ** Math.min(n - k.allowed, 40))
    waitUntil = Math.max(waitUntil, Number(earlier.last) + wait)
  }
  if (waitUntil > Date.now()) {
    await releaseAttempt(ids)
    const retryAfter = Math.max(1, Math.ceil((waitUntil - Date.now()) / 1000))
    setResponseHeader(event, 'Retry-After', retryAfter)
    throw createError({
      status: 429,
      statusText: 'Too Many Requests',
      message: `Too many wrong passwords. Try again in ${retryAfter} s.`,
      data: { code: 'too-many-attempts', retryAfterSeconds: retryAfter },
    })
  }
  let ok = false
  try {
    ok = await check()
  }
  finally {
    if (ok) {
      await releaseAttempt(ids)
      await clearSigninFailures(accountKey)
    }
    else {
      // The wait runs from the failure's answer, not from its start (a slow check would eat it).
      if (ids.length) await db.update(t).set({ at: new Date() }).where(inArray(t.id, ids))
      await pruneAttempts('account:', config.signinWindowMs)
      await pruneAttempts('ip:', config.signinWindowMs)
    }
  }
  return ok
}

export async function clearSigninFailures(key: string) {
  await useDB().delete(schema.signinFailures).where(eq(schema.signinFailures.key, key))
}
