import { alias } from 'drizzle-orm/sqlite-core'
import { and, desc, eq, or, sql, type SQL } from 'drizzle-orm'
import { studyListQuerySchema } from '#shared/types/studies'

/** Studies, newest first: `{ items, total }` (filter by `lobe`, or by the pair `pairA`/`pairB`). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const q = queryAs(event, studyListQuerySchema)
  const db = useDB()
  const s = schema.studies
  const la = alias(schema.lobes, 'la')
  const lb = alias(schema.lobes, 'lb')
  const where: SQL[] = []
  if (q.lobe) where.push(or(eq(s.lobeAId, q.lobe), eq(s.lobeBId, q.lobe))!)
  if (q.pairA && q.pairB) where.push(or(and(eq(s.lobeAId, q.pairA), eq(s.lobeBId, q.pairB)), and(eq(s.lobeAId, q.pairB), eq(s.lobeBId, q.pairA)))!)
  const cond = where.length ? and(...where) : undefined
  const rows = await db.select({ study: s, a: { id: la.id, name: la.name, sha256: la.sha256 }, b: { id: lb.id, name: lb.name, sha256: lb.sha256 }, ownerName: schema.users.name })
    .from(s).innerJoin(la, eq(la.id, s.lobeAId)).innerJoin(lb, eq(lb.id, s.lobeBId)).innerJoin(schema.users, eq(schema.users.id, s.ownerId))
    .where(cond).orderBy(desc(s.createdAt), desc(s.id)).limit(q.limit).offset(q.offset)
  const total = (await db.select({ n: sql<number>`count(*)` }).from(s).where(cond).get())?.n ?? 0
  return {
    items: rows.map((r) => {
      const v = studyView(r.study, { a: r.a, b: r.b }, r.ownerName)
      const res = r.study.result as { contact?: Record<string, unknown>, neck?: Record<string, unknown>, merged?: Record<string, unknown> } | null
      return { ...v, result: undefined, summary: res ? { speed: res.contact?.speed ?? null, escapeSpeed: res.contact?.escapeSpeed ?? null, contact: res.contact?.contact !== false, neckRadius: res.neck?.equivalentRadius ?? null, spinPeriod: res.merged?.spinPeriod ?? null } : null }
    }),
    total,
  }
})
