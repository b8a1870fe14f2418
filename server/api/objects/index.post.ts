import { objectCreateSchema } from '#shared/types/records'

/** Create an object record (analyst). The creator follows it. 409 when the designation is taken (case-insensitive). */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const body = await readBodyAs(event, objectCreateSchema)
  const db = useDB()
  let id: number
  try {
    id = await db.transaction(async (tx) => {
      const [row] = await tx.insert(schema.objects).values({
        designation: body.designation,
        name: body.name,
        population: body.population,
        notes: body.notes,
        orbitAAu: body.orbit?.semiMajorAxisAu ?? null,
        orbitE: body.orbit?.eccentricity ?? null,
        orbitIDeg: body.orbit?.inclinationDeg ?? null,
        tags: body.tags,
        createdBy: actor.id,
      }).returning({ id: schema.objects.id })
      await writeTags(tx, row!.id, body.tags)
      await writeManualLinks(tx as unknown as DB, row!.id, actor.id, body.lobes, body.studies)
      await tx.insert(schema.objectFollows).values({ objectId: row!.id, userId: actor.id }).onConflictDoNothing()
      await audit(event, { actorId: actor.id, action: 'record.created', subjectType: 'object', subjectId: row!.id, detail: { designation: body.designation, name: body.name } }, tx)
      return row!.id
    })
  }
  catch (error) {
    if (isDesignationClash(error)) throw recordConflict(`A record with the designation "${body.designation}" already exists`)
    throw error
  }
  setResponseStatus(event, 201)
  return { id }
})
