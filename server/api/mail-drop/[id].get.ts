import { eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/** One caught message with its raw source (admin). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const { id } = paramsAs(event, idParamSchema)
  const row = await useDB().select().from(schema.mailMessages).where(eq(schema.mailMessages.id, id)).get()
  if (!row) throw notFound('Message')
  return row
})
