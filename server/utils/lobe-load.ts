import { eq } from 'drizzle-orm'

/** One lobe with its owner's name and latest surface job, as the API shows it; 404 when absent. */
export async function loadLobeView(db: DB, id: number) {
  const row = await db.select({ lobe: schema.lobes, ownerName: schema.users.name }).from(schema.lobes)
    .innerJoin(schema.users, eq(schema.users.id, schema.lobes.ownerId)).where(eq(schema.lobes.id, id)).get()
  if (!row) throw notFound('Lobe')
  return { lobe: row.lobe, view: lobeView(row.lobe, (await latestJobs(db, [id])).get(id), { id: row.lobe.ownerId, name: row.ownerName }) }
}
