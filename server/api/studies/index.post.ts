import { inArray } from 'drizzle-orm'
import { studyInputSchema } from '#shared/types/studies'

/** Start a contact study → 202 `{ id }`; the work runs on a worker thread. Invalid input → 422 naming each field. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const input = await readBodyAs(event, studyInputSchema)
  const db = useDB()
  const rows = await db.select().from(schema.lobes).where(inArray(schema.lobes.id, [input.lobeA, input.lobeB]))
  const a = rows.find(r => r.id === input.lobeA)
  const b = rows.find(r => r.id === input.lobeB)
  const missing = [!a && { path: 'lobeA', message: `no lobe ${input.lobeA}` }, !b && { path: 'lobeB', message: `no lobe ${input.lobeB}` }].filter(Boolean) as { path: string, message: string }[]
  if (missing.length) throw unprocessable('Unknown lobe', missing)
  const study = await createStudy(db, actor.id, a!, b!, input)
  await audit(event, { actorId: actor.id, action: 'study.created', subjectType: 'study', subjectId: study.id, detail: { lobeA: a!.id, lobeB: b!.id, reused: study.status === 'done' } })
  setResponseStatus(event, 202)
  return { id: study.id, status: study.status }
})
