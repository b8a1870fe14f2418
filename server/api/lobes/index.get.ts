import { and, asc, desc, eq, sql, type SQL } from 'drizzle-orm'
import { lobeListQuerySchema } from '#shared/types/lobes'

/** Lobes, paged and sortable: `{ items, total }` (items carry the headline properties). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const q = queryAs(event, lobeListQuerySchema)
  const db = useDB()
  const l = schema.lobes
  const where: SQL[] = []
  if (q.q) where.push(containsText(l.name, q.q))
  if (q.owner) where.push(eq(l.ownerId, q.owner))
  const cond = where.length ? and(...where) : undefined
  const sortCol = {
    createdAt: l.createdAt, name: sql`lower(${l.name})`, faceCount: l.faceCount, density: l.density,
    volume: sql`json_extract(${l.properties}, '$.volume')`,
  }[q.sort]
  const rows = await db.select({ lobe: l, ownerName: schema.users.name }).from(l).innerJoin(schema.users, eq(schema.users.id, l.ownerId))
    .where(cond).orderBy(q.order === 'asc' ? asc(sortCol) : desc(sortCol), desc(l.id)).limit(q.limit).offset(q.offset)
  const total = (await db.select({ n: sql<number>`count(*)` }).from(l).where(cond).get())?.n ?? 0
  const jobs = await latestJobs(db, rows.map(r => r.lobe.id))
  return {
    items: rows.map(({ lobe, ownerName }) => {
      const v = lobeView(lobe, jobs.get(lobe.id), { id: lobe.ownerId, name: ownerName })
      const { harmonics: _h, degree2: _d, rotationToPrincipal: _r, ...headline } = v.properties
      return { ...v, report: undefined, properties: headline }
    }),
    total,
  }
})
