import { asc, eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/** The comment thread of one attachment, oldest first (review decisions with a comment included). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const db = useDB()
  const exists = await db.select({ id: schema.attachments.id }).from(schema.attachments).where(eq(schema.attachments.id, id)).get()
  if (!exists) throw notFound('Attachment')
  const rows = await db.select().from(schema.attachmentComments).where(eq(schema.attachmentComments.attachmentId, id)).orderBy(asc(schema.attachmentComments.id))
  const names = await memberNames(db, rows.map(r => r.authorId))
  return { items: rows.map(r => commentView(r, names)) }
})
