import { alias } from 'drizzle-orm/sqlite-core'
import { eq } from 'drizzle-orm'

/** One study with its two lobes and owner name, or 404. */
export async function loadStudy(db: DB, id: number) {
  const la = alias(schema.lobes, 'la')
  const lb = alias(schema.lobes, 'lb')
  const row = await db.select({ study: schema.studies, a: la, b: lb, ownerName: schema.users.name }).from(schema.studies)
    .innerJoin(la, eq(la.id, schema.studies.lobeAId)).innerJoin(lb, eq(lb.id, schema.studies.lobeBId))
    .innerJoin(schema.users, eq(schema.users.id, schema.studies.ownerId)).where(eq(schema.studies.id, id)).get()
  if (!row) throw notFound('Study')
  return row
}
