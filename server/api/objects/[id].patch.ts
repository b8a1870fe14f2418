import { eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'
import { objectUpdateSchema } from '#shared/types/records'

/** Edit a record (analyst). `lobes` / `studies` replace the manual links; links made by attachments stay. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const { id } = paramsAs(event, idParamSchema)
  const change = await readBodyAs(event, objectUpdateSchema)
  const db = useDB()
  const before = await db.select().from(schema.objects).where(eq(schema.objects.id, id)).get()
  if (!before) throw recordNotFound()
  const set: Partial<typeof schema.objects.$inferInsert> = { updatedAt: new Date() }
  if (change.designation !== undefined) set.designation = change.designation
  if (change.name !== undefined) set.name = change.name
  if (change.population !== undefined) set.population = change.population
  if (change.notes !== undefined) set.notes = change.notes
  if (change.tags !== undefined) set.tags = change.tags
  if (change.orbit !== undefined) {
    set.orbitAAu = change.orbit?.semiMajorAxisAu ?? null
    set.orbitE = change.orbit?.eccentricity ?? null
    set.orbitIDeg = change.orbit?.inclinationDeg ?? null
  }
  try {
    await db.transaction(async (tx) => {
      await tx.update(schema.objects).set(set).where(eq(schema.objects.id, id))
      if (change.tags !== undefined) await writeTags(tx, id, change.tags)
      await writeManualLinks(tx as unknown as DB, id, actor.id, change.lobes, change.studies)
      await audit(event, { actorId: actor.id, action: 'record.updated', subjectType: 'object', subjectId: id, detail: { fields: Object.keys(change) } }, tx)
    })
  }
  catch (error) {
    if (isDesignationClash(error)) throw recordConflict(`A record with the designation "${change.designation}" already exists`)
    throw error
  }
  return (await loadRecord(db, id, actor.id))!.object
})
