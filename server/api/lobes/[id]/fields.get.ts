import { eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/**
 * Per-face surface fields of the evaluation surface (the faces and vertices it lists; metres, file
 * frame): gravity (m s⁻²), slopeDeg, geopotentialHeight (m), potential (m² s⁻²), escapeSpeed
 * (m s⁻¹). 409 while the job is still running.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const db = useDB()
  const lobe = await db.select().from(schema.lobes).where(eq(schema.lobes.id, id)).get()
  if (!lobe) throw notFound('Lobe')
  const fields = await readFields(lobe)
  if (!fields) {
    const job = (await latestJobs(db, [id])).get(id)
    throw createError({ status: 409, statusText: 'Conflict', message: 'The surface fields are not ready yet', data: { gravityJob: job ? { id: job.id, status: job.status, progress: job.progress } : null } })
  }
  return fields
})
