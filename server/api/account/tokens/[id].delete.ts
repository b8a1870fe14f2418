import { and, eq, isNull } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/** Revoke one of one's API tokens. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const t = schema.apiTokens
  await useDB().transaction(async (tx) => {
    const [row] = await tx.update(t).set({ revokedAt: new Date() }).where(and(eq(t.id, id), eq(t.userId, actor.id), isNull(t.revokedAt))).returning()
    if (!row) throw notFound('Token')
    await audit(event, { actorId: actor.id, action: 'api-token.revoked', subjectType: 'api_token', subjectId: id }, tx)
  })
  return { ok: true }
})
