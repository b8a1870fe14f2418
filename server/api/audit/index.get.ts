import { desc, eq, sql } from 'drizzle-orm'
import { z } from 'zod'

const query = z.object({ limit: z.coerce.number().int().min(1).max(500).default(100), offset: z.coerce.number().int().min(0).default(0) })

/** The audit trail, newest first (admin). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const { limit, offset } = queryAs(event, query)
  const db = useDB()
  const a = schema.auditEvents
  const items = await db.select({ id: a.id, action: a.action, subjectType: a.subjectType, subjectId: a.subjectId, detail: a.detail, ip: a.ip, createdAt: a.createdAt, actorId: a.actorId, actorName: schema.users.name })
    .from(a).leftJoin(schema.users, eq(schema.users.id, a.actorId)).orderBy(desc(a.id)).limit(limit).offset(offset)
  const total = (await db.select({ n: sql<number>`count(*)` }).from(a).get())?.n ?? 0
  return { items, total }
})
