import { accountUpdateSchema } from '#shared/types/account'
import { eq } from 'drizzle-orm'

/** Change one's display name (the session cookie carries it, so it is rewritten too). */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const { name } = await readBodyAs(event, accountUpdateSchema)
  const user = await useDB().transaction(async (tx) => {
    const [row] = await tx.update(schema.users).set({ name }).where(eq(schema.users.id, actor.id)).returning()
    if (!row) throw notFound('Account')
    await audit(event, { actorId: actor.id, action: 'account.renamed', subjectType: 'user', subjectId: actor.id }, tx)
    return row
  })
  if (actor.via === 'session') await startSession(event, user, actor.signedInAt)
  return memberView(user)
})
