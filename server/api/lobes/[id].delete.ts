import { and, eq, or, sql } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/**
 * Delete a lobe (owner or admin); 409 while a study cites it. The stored file goes with its last
 * lobe, derived files (analysis, display, fields) with the last lobe using them.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const { id } = paramsAs(event, idParamSchema)
  const db = useDB()
  const lobe = await db.select().from(schema.lobes).where(eq(schema.lobes.id, id)).get()
  if (!lobe) throw notFound('Lobe')
  if (lobe.ownerId !== actor.id && actor.role !== 'admin') throw createError({ status: 403, statusText: 'Forbidden', message: 'Only the owner or an admin may delete this lobe' })
  const cited = await db.select({ n: sql<number>`count(*)` }).from(schema.studies).where(or(eq(schema.studies.lobeAId, id), eq(schema.studies.lobeBId, id))).get()
  if (cited && cited.n > 0) throw createError({ status: 409, statusText: 'Conflict', message: `This lobe is cited by ${cited.n} contact stud${cited.n === 1 ? 'y' : 'ies'}; it cannot be deleted` })
  // The rows and the audit event in one transaction; the files go once it has committed.
  let file: typeof schema.meshFiles.$inferSelect | undefined
  try {
    file = await db.transaction(async (tx) => {
      // A surface job shared with other lobes stays theirs (its row would go with this lobe's).
      await tx.update(schema.jobs).set({ lobeId: sql`(select min(l.id) from lobes l where l.surface_job_id = ${schema.jobs.id} and l.id != ${id})` })
        .where(and(eq(schema.jobs.lobeId, id), sql`exists (select 1 from lobes l where l.surface_job_id = ${schema.jobs.id} and l.id != ${id})`))
      await tx.delete(schema.lobes).where(eq(schema.lobes.id, id))
      await audit(event, { actorId: actor.id, action: 'lobe.deleted', subjectType: 'lobe', subjectId: id, detail: { sha256: lobe.sha256, name: lobe.name } }, tx)
      const others = await tx.select({ n: sql<number>`count(*)` }).from(schema.lobes).where(eq(schema.lobes.sha256, lobe.sha256)).get()
      if (others?.n) return undefined
      const [gone] = await tx.delete(schema.meshFiles).where(eq(schema.meshFiles.sha256, lobe.sha256)).returning()
      return gone
    })
  }
  catch (error) {
    // Another table (e.g. an object record's attachment) still refers to it.
    const e = error as { message?: string, cause?: { message?: string } }
    if (/FOREIGN KEY/i.test(`${e.cause?.message} ${e.message}`)) {
      throw createError({ status: 409, statusText: 'Conflict', message: 'This lobe is cited by an object record; it cannot be deleted' })
    }
    throw error
  }
  await deleteLobeFiles(db, lobe, file?.storedPath)
  return { ok: true }
})
