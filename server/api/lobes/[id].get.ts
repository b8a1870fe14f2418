import { eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/** One lobe with its properties (SI), validation report and surface-field job state. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const db = useDB()
  const row = await db.select({ lobe: schema.lobes, ownerName: schema.users.name }).from(schema.lobes)
    .innerJoin(schema.users, eq(schema.users.id, schema.lobes.ownerId)).where(eq(schema.lobes.id, id)).get()
  if (!row) throw notFound('Lobe')
  const jobs = await latestJobs(db, [id])
  return lobeView(row.lobe, jobs.get(id), { id: row.lobe.ownerId, name: row.ownerName })
})
