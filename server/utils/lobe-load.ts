import type { H3Event } from 'h3'
import { eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/** One lobe with its owner's name and latest surface job, as the API shows it; 404 when absent. */
export async function loadLobeView(db: DB, id: number) {
  const row = await db.select({ lobe: schema.lobes, ownerName: schema.users.name }).from(schema.lobes)
    .innerJoin(schema.users, eq(schema.users.id, schema.lobes.ownerId)).where(eq(schema.lobes.id, id)).get()
  if (!row) throw notFound('Lobe')
  return { lobe: row.lobe, view: lobeView(row.lobe, (await latestJobs(db, [id])).get(id), { id: row.lobe.ownerId, name: row.ownerName }) }
}

/**
 * Loads a lobe for an export route (viewer): an export made with an API token is audited, as
 * record exports are.
 * @throws 404 when the lobe does not exist
 */
export async function lobeForExport(event: H3Event, format: 'json' | 'csv') {
  const actor = await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const loaded = await loadLobeView(useDB(), id)
  if (actor.via === 'token') {
    await audit(event, { actorId: actor.id, action: 'lobe.exported', subjectType: 'lobe', subjectId: id, detail: { format, token: actor.tokenId } })
  }
  return { id, ...loaded }
}
