import { idParamSchema } from '#shared/types/account'

/**
 * A study: `{ status, progress, stage, error, result, ... }` (result in SI, contact frame); while
 * queued, `queuePosition` (1 = next to get a worker).
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const db = useDB()
  const row = await loadStudy(db, id)
  const queuePosition = row.study.status === 'queued' && row.study.jobId ? (await queuePositions(db)).get(row.study.jobId) ?? null : null
  return { ...studyView(row.study, { a: row.a, b: row.b }, row.ownerName), queuePosition }
})
