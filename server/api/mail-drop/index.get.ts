import { desc, sql } from 'drizzle-orm'
import { z } from 'zod'

const query = z.object({ limit: z.coerce.number().int().min(1).max(200).default(50), offset: z.coerce.number().int().min(0).default(0) })

/** Messages caught by the embedded SMTP server, newest first (admin). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const { limit, offset } = queryAs(event, query)
  const db = useDB()
  const m = schema.mailMessages
  const items = await db.select({ id: m.id, envelopeFrom: m.envelopeFrom, envelopeTo: m.envelopeTo, subject: m.subject, text: m.text, receivedAt: m.receivedAt })
    .from(m).orderBy(desc(m.id)).limit(limit).offset(offset)
  const total = (await db.select({ n: sql<number>`count(*)` }).from(m).get())?.n ?? 0
  return { items, total, embedded: !useConfig().smtpUrl }
})
