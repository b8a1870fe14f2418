import { and, asc, desc, eq, sql, type SQL } from 'drizzle-orm'
import { objectListQuerySchema } from '#shared/types/records'

/**
 * Object records, filtered and sorted in the database and paged: `q` matches designation, name or a
 * tag (case-insensitive substring); `population` and `tag` filter exactly. `awaiting=review` keeps the
 * records with values awaiting review that the caller did not propose (each item then has
 * `awaitingCount` and `oldestAwaitingAt`); `awaiting=mine` keeps the records where the caller proposed
 * values (each item then has `mine: { proposed, accepted, rejected, superseded }`). Answers
 * `{ items, total }` and a `Server-Timing: db;dur=<ms>` header.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const query = queryAs(event, objectListQuerySchema)
  const started = performance.now()
  const db = useDB()
  const o = schema.objects
  const where: SQL[] = []
  if (query.q) {
    const like = `%${query.q.replace(/[\\%_]/g, c => `\\${c}`)}%`
    where.push(sql`(${o.designation} like ${like} escape '\\' or ${o.name} like ${like} escape '\\' or objects.id in (select t.object_id from object_tags t where t.tag like ${like.toLowerCase()} escape '\\'))`)
  }
  if (query.population) where.push(eq(o.population, query.population))
  if (query.tag) where.push(sql`exists (select 1 from object_tags t where t.object_id = objects.id and t.tag = ${query.tag})`)
  const awaitingOthers = sql`a.object_id = objects.id and a.state = 'proposed' and a.proposed_by <> ${actor.id}`
  const byMe = sql`a.object_id = objects.id and a.proposed_by = ${actor.id}`
  if (query.awaiting === 'review') where.push(sql`exists (select 1 from attachments a where ${awaitingOthers})`)
  if (query.awaiting === 'mine') where.push(sql`exists (select 1 from attachments a where ${byMe})`)
  const filter = where.length ? and(...where) : undefined

  // The counts are columns kept by triggers on attachments (migration 0003), so sorting by them is an index read.
  const columns: Record<typeof query.sort, SQL> = {
    designation: sql`${o.designation} collate nocase`,
    name: sql`${o.name} collate nocase`,
    population: sql`${o.population}`,
    createdAt: sql`${o.createdAt}`,
    updatedAt: sql`${o.updatedAt}`,
    proposed: sql`${o.proposedCount}`,
    accepted: sql`${o.acceptedCount}`,
  }
  const dir = query.order === 'asc' ? asc : desc
  const order = [dir(columns[query.sort])]
  if (query.sort === 'population') order.push(asc(sql`${o.designation} collate nocase`))
  order.push(dir(o.id))

  // The per-caller counts are read only when asked for (they are subqueries per row).
  const review = query.awaiting === 'review'
  const mine = query.awaiting === 'mine'
  const none = sql<number>`0`
  const page = db.select({
    object: o,
    awaitingCount: review ? sql<number>`(select count(*) from attachments a where ${awaitingOthers})` : none,
    oldestAwaitingAt: review ? sql<number | null>`(select min(a.proposed_at) from attachments a where ${awaitingOthers})` : sql<null>`null`,
    mineProposed: mine ? sql<number>`(select count(*) from attachments a where ${byMe} and a.state = 'proposed')` : none,
    mineAccepted: mine ? sql<number>`(select count(*) from attachments a where ${byMe} and a.state = 'accepted')` : none,
    mineRejected: mine ? sql<number>`(select count(*) from attachments a where ${byMe} and a.state = 'rejected')` : none,
    mineSuperseded: mine ? sql<number>`(select count(*) from attachments a where ${byMe} and a.state = 'superseded')` : none,
  }).from(o)
  const [rows, count] = await Promise.all([
    page.where(filter).orderBy(...order).limit(query.limit).offset(query.offset),
    db.select({ n: sql<number>`count(*)` }).from(o).where(filter).get(),
  ])
  setResponseHeader(event, 'Server-Timing', `db;dur=${(performance.now() - started).toFixed(1)};desc="list records"`)
  return {
    items: rows.map(r => ({
      ...objectView(r.object),
      proposedCount: r.object.proposedCount,
      acceptedCount: r.object.acceptedCount,
      ...(review ? { awaitingCount: Number(r.awaitingCount), oldestAwaitingAt: r.oldestAwaitingAt === null ? null : new Date(Number(r.oldestAwaitingAt)).toISOString() } : {}),
      ...(mine ? { mine: { proposed: Number(r.mineProposed), accepted: Number(r.mineAccepted), rejected: Number(r.mineRejected), superseded: Number(r.mineSuperseded) } } : {}),
    })),
    total: Number(count?.n ?? 0),
    limit: query.limit,
    offset: query.offset,
  }
})
