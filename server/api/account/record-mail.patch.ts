import { recordMailPreferencesSchema } from '#shared/types/records'

/** Turn record mails on or off, per kind: proposals, decisions, comments. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const change = await readBodyAs(event, recordMailPreferencesSchema)
  const row = await useDB().transaction(async (tx) => {
    const [saved] = await tx.insert(schema.mailPreferences).values({ userId: actor.id, ...change })
      .onConflictDoUpdate({ target: schema.mailPreferences.userId, set: { ...change, updatedAt: new Date() } })
      .returning()
    await audit(event, { actorId: actor.id, action: 'record.mail-preferences-changed', subjectType: 'user', subjectId: actor.id, detail: change }, tx)
    return saved
  })
  return { proposals: row!.proposals, decisions: row!.decisions, comments: row!.comments }
})
