import { rm } from 'node:fs/promises'
import { join } from 'node:path'
import { eq, or, sql } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/** Delete a lobe (owner or admin); 409 while a study cites it. The file goes with its last lobe. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const { id } = paramsAs(event, idParamSchema)
  const db = useDB()
  const lobe = await db.select().from(schema.lobes).where(eq(schema.lobes.id, id)).get()
  if (!lobe) throw notFound('Lobe')
  if (lobe.ownerId !== actor.id && actor.role !== 'admin') throw createError({ status: 403, statusText: 'Forbidden', message: 'Only the owner or an admin may delete this lobe' })
  const cited = await db.select({ n: sql<number>`count(*)` }).from(schema.studies).where(or(eq(schema.studies.lobeAId, id), eq(schema.studies.lobeBId, id))).get()
  if (cited && cited.n > 0) throw createError({ status: 409, statusText: 'Conflict', message: `This lobe is cited by ${cited.n} contact stud${cited.n === 1 ? 'y' : 'ies'}; it cannot be deleted` })
  try {
    await db.delete(schema.lobes).where(eq(schema.lobes.id, id))
  }
  catch (error) {
    // Another table (e.g. an object record's attachment) still refers to it.
    if (/FOREIGN KEY/i.test(`${(error as { cause?: { message?: string } }).cause?.message}`)) {
      throw createError({ status: 409, statusText: 'Conflict', message: 'This lobe is cited by an object record; it cannot be deleted' })
    }
    throw error
  }
  const others = await db.select({ n: sql<number>`count(*)` }).from(schema.lobes).where(eq(schema.lobes.sha256, lobe.sha256)).get()
  if (!others?.n) {
    const file = await db.select().from(schema.meshFiles).where(eq(schema.meshFiles.sha256, lobe.sha256)).get()
    await db.delete(schema.meshFiles).where(eq(schema.meshFiles.sha256, lobe.sha256))
    const root = uploadPaths().root
    if (file) await rm(join(root, file.storedPath), { force: true })
    for (const units of ['m', 'km'] as const) {
      const d = derivedMeshPaths(lobe.sha256, units)
      await rm(d.analysis, { force: true })
      await rm(d.display, { force: true })
    }
  }
  await audit(event, { actorId: actor.id, action: 'lobe.deleted', subjectType: 'lobe', subjectId: id, detail: { sha256: lobe.sha256, name: lobe.name } })
  return { ok: true }
})
