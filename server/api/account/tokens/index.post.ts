import { apiTokenCreateSchema } from '#shared/types/account'

/** Create a personal API token; it acts with one's current role and is shown only in this answer. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  if (actor.via === 'token') throw createError({ status: 403, statusText: 'Forbidden', message: 'Create tokens from a signed-in session, not with another token' })
  const { label } = await readBodyAs(event, apiTokenCreateSchema)
  const token = `ism_${newToken()}`
  const row = await useDB().transaction(async (tx) => {
    const [created] = await tx.insert(schema.apiTokens).values({ userId: actor.id, label, tokenHash: hashToken(token), prefix: token.slice(0, 10) }).returning()
    await audit(event, { actorId: actor.id, action: 'api-token.created', subjectType: 'api_token', subjectId: created!.id, detail: { label } }, tx)
    return created
  })
  setResponseStatus(event, 201)
  return { id: row!.id, label, prefix: row!.prefix, token }
})
