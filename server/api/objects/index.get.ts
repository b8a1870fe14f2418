import { and, asc, desc, eq, inArray, sql, type SQL } from 'drizzle-orm'
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

  // Sorting by a count joins one grouped pass over the (state, object_id) index. Columns are written
  // out in full: Drizzle leaves them unqualified in raw SQL, where a bare "id" would bind to attachments.
  const countSort = query.sort === 'proposed' || query.sort === 'accepted' ? query.sort : null
  const counted = sql`(select object_id, count(*) as n from attachments where state = ${countSort} group by object_id) as counted`
  const columns: Record<typeof query.sort, SQL> = {
    designation: sql`${o.designation} collate nocase`,
    name: sql`${o.name} collate nocase`,
    population: sql`${o.population}`,
    createdAt: sql`${o.createdAt}`,
    updatedAt: sql`${o.updatedAt}`,
    proposed: sql`coalesce(counted.n, 0)`,
    accepted: sql`coalesce(counted.n, 0)`,
  }
  const dir = query.order === 'asc' ? asc : desc
  const order = [dir(columns[query.sort])]
  if (query.sort === 'population') order.push(asc(sql`${o.designation} collate nocase`))
  order.push(dir(o.id))

  const page = countSort
    ? db.select({ object: o }).from(o).leftJoin(counted, sql`counted.object_id = objects.id`)
    : db.select({ object: o }).from(o)
  const [rows, count] = await Promise.all([
    page.where(filter).orderBy(...order).limit(query.limit).offset(query.offset),
    db.select({ n: sql<number>`count(*)` }).from(o).where(filter).get(),
  ])
  // Counts for the rows of this page only.
  const ids = rows.map(r => r.object.id)
  const tallies = ids.length
    ? await db.select({ objectId: schema.attachments.objectId, state: schema.attachments.state, n: sql<number>`count(*)` })
        .from(schema.attachments)
        .where(and(inArray(schema.attachments.objectId, ids), inArray(schema.attachments.state, ['proposed', 'accepted'])))
        .groupBy(schema.attachments.objectId, schema.attachments.state)
    : []
  const tally = (id: number, state: string) => Number(tallies.find(t => t.objectId === id && t.state === state)?.n ?? 0)
  setResponseHeader(event, 'Server-Timing', `db;dur=${(performance.now() - started).toFixed(1)};desc="list records"`)
  return {
    items: rows.map(r => ({ ...objectView(r.object), proposedCount: tally(r.object.id, 'proposed'), acceptedCount: tally(r.object.id, 'accepted') })),
    total: Number(count?.n ?? 0),
    limit: query.limit,
    offset: query.offset,
  }
})
