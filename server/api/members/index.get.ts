import { asc } from 'drizzle-orm'

/** All members (admin). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const rows = await useDB().select().from(schema.users).orderBy(asc(schema.users.name))
  return { items: rows.map(memberView), total: rows.length }
})
