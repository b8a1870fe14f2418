import { eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'
import { lobeUpdateSchema } from '#shared/types/lobes'
import { withDensity, withReferenceRadius } from '#shared/geometry'
import type { MassProperties } from '#shared/geometry'

/**
 * Rename a lobe, or change its density, reference radius or spin (owner or admin). Mass-dependent
 * values are re-derived from the stored ones without re-reading the file; the surface fields are
 * recomputed in the background.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const { id } = paramsAs(event, idParamSchema)
  const change = await readBodyAs(event, lobeUpdateSchema)
  const db = useDB()
  const lobe = await db.select().from(schema.lobes).where(eq(schema.lobes.id, id)).get()
  if (!lobe) throw notFound('Lobe')
  if (lobe.ownerId !== actor.id && actor.role !== 'admin') throw createError({ status: 403, statusText: 'Forbidden', message: 'Only the owner or an admin may change this lobe' })
  let props = lobe.properties as unknown as MassProperties
  if (change.density !== undefined) props = withDensity(props, change.density)
  if (change.referenceRadius !== undefined) props = withReferenceRadius(props, change.referenceRadius ?? props.equivalentRadius)
  const updated = await db.transaction(async (tx) => {
    const [row] = await tx.update(schema.lobes).set({
      name: change.name ?? lobe.name,
      density: change.density ?? lobe.density,
      referenceRadius: change.referenceRadius === undefined ? lobe.referenceRadius : change.referenceRadius,
      spinPeriodHours: change.spinPeriodHours === undefined ? lobe.spinPeriodHours : change.spinPeriodHours,
      spinAxis: change.spinAxis === undefined ? lobe.spinAxis : change.spinAxis,
      properties: props as unknown as Record<string, unknown>,
      surface: change.density !== undefined || change.spinPeriodHours !== undefined || change.spinAxis !== undefined ? null : lobe.surface,
    }).where(eq(schema.lobes.id, id)).returning()
    // the audit keeps the values before the change beside the new ones
    const before = Object.fromEntries(Object.keys(change).map(k => [k, lobe[k as keyof typeof lobe] ?? null]))
    await audit(event, { actorId: actor.id, action: 'lobe.updated', subjectType: 'lobe', subjectId: id, detail: { ...change, before } }, tx)
    return row!
  })
  let job = (await latestJobs(db, [id])).get(id)
  if (updated.surface === null) job = await startSurfaceJob(db, updated)
  return lobeView(updated, job)
})
