import { idParamSchema } from '#shared/types/account'

/** Stop a queued or running study (its owner or an admin); 409 when it has already finished. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const { id } = paramsAs(event, idParamSchema)
  const db = useDB()
  const { study } = await loadStudy(db, id)
  if (study.ownerId !== actor.id && actor.role !== 'admin') throw createError({ status: 403, statusText: 'Forbidden', message: 'Only the owner or an admin may cancel this study' })
  if (!(await cancelStudy(db, id))) throw createError({ status: 409, statusText: 'Conflict', message: `The study is already ${study.status}` })
  await audit(event, { actorId: actor.id, action: 'study.cancelled', subjectType: 'study', subjectId: id })
  return { ok: true, status: 'cancelled' }
})
