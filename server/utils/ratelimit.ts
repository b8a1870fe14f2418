import type { H3Event } from 'h3'
import { and, eq, gte, inArray, lt, sql } from 'drizzle-orm'

/**
 * Sign-in throttling: at most `signinMaxFailures` failed attempts per account and
 * `signinMaxFailuresPerIp` per client address within `signinWindowMs`. Kept in the database so it survives restarts and holds across
 * server processes sharing one database.
 * @throws 429 with `Retry-After` (seconds) when either key is over the limit.
 */
export async function assertSigninAllowed(event: H3Event, keys: string[]) {
  const { signinMaxFailures, signinMaxFailuresPerIp, signinWindowMs } = useConfig()
  const db = useDB()
  const since = new Date(Date.now() - signinWindowMs)
  const rows = await db.select({ key: schema.signinFailures.key, n: sql<number>`count(*)`, oldest: sql<number>`min(${schema.signinFailures.at})` })
    .from(schema.signinFailures)
    .where(and(inArray(schema.signinFailures.key, keys), gte(schema.signinFailures.at, since)))
    .groupBy(schema.signinFailures.key)
  const over = rows.filter(r => r.n >= (r.key.startsWith('ip:') ? signinMaxFailuresPerIp : signinMaxFailures))
  if (over.length) {
    const retryMs = Math.max(...over.map(r => Number(r.oldest) + signinWindowMs - Date.now()))
    const retryAfter = Math.max(1, Math.ceil(retryMs / 1000))
    setResponseHeader(event, 'Retry-After', retryAfter)
    throw createError({
      status: 429,
      statusText: 'Too Many Requests',
      message: `Too many failed sign-ins. Try again in ${retryAfter} s.`,
      data: { retryAfterSeconds: retryAfter },
    })
  }
}

export async function recordSigninFailure(keys: string[]) {
  const db = useDB()
  const at = new Date()
  await db.insert(schema.signinFailures).values(keys.map(key => ({ key, at })))
  // Old rows are of no further use.
  await db.delete(schema.signinFailures).where(lt(schema.signinFailures.at, new Date(Date.now() - 2 * useConfig().signinWindowMs)))
}

export async function clearSigninFailures(key: string) {
  await useDB().delete(schema.signinFailures).where(eq(schema.signinFailures.key, key))
}
