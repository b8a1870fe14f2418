import { eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/** The lobe's values with units and provenance, as a download. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const db = useDB()
  const row = await db.select({ lobe: schema.lobes, ownerName: schema.users.name }).from(schema.lobes)
    .innerJoin(schema.users, eq(schema.users.id, schema.lobes.ownerId)).where(eq(schema.lobes.id, id)).get()
  if (!row) throw notFound('Lobe')
  const view = lobeView(row.lobe, (await latestJobs(db, [id])).get(id), { id: row.lobe.ownerId, name: row.ownerName })
  setResponseHeader(event, 'content-disposition', `attachment; filename="lobe-${id}.json"`)
  return {
    ...view,
    units: Object.fromEntries(LOBE_PROPERTY_ROWS.map(r => [r.key, r.unit])),
    provenance: { sourceFileName: view.sourceFileName, sha256: view.sha256, units: view.units, density: view.properties.density, algorithmVersion: view.algorithmVersion, exportedAt: new Date().toISOString() },
  }
})
