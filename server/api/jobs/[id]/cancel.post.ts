import { eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/** Cancel a queued or running job (admin); its lobes keep their last fields, its studies say cancelled. 409 when it has finished. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'admin')
  const { id } = paramsAs(event, idParamSchema)
  const db = useDB()
  const job = await db.select().from(schema.jobs).where(eq(schema.jobs.id, id)).get()
  if (!job) throw notFound('Job')
  if (!(await cancelJob(db, id, `cancelled by ${actor.name}`))) throw createError({ status: 409, statusText: 'Conflict', message: `The job is already ${job.status}` })
  await audit(event, { actorId: actor.id, action: 'job.cancelled', subjectType: 'job', subjectId: id, detail: { kind: job.kind } })
  return { ok: true, status: 'cancelled' }
})
