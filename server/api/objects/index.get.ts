import { and, asc, desc, eq, sql, type SQL } from 'drizzle-orm'
import { objectListQuerySchema } from '#shared/types/records'

/**
 * Object records, filtered and sorted in the database and paged: `q` matches designation, name or a
 * tag (case-insensitive substring); `population` and `tag` filter exactly. Answers `{ items, total }`
 * and a `Server-Timing: db;dur=<ms>` header.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
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

  const page = db.select({ object: o }).from(o)
  const [rows, count] = await Promise.all([
    page.where(filter).orderBy(...order).limit(query.limit).offset(query.offset),
    db.select({ n: sql<number>`count(*)` }).from(o).where(filter).get(),
  ])
  setResponseHeader(event, 'Server-Timing', `db;dur=${(performance.now() - started).toFixed(1)};desc="list records"`)
  return {
    items: rows.map(r => ({ ...objectView(r.object), proposedCount: r.object.proposedCount, acceptedCount: r.object.acceptedCount })),
    total: Number(count?.n ?? 0),
    limit: query.limit,
    offset: query.offset,
  }
})
