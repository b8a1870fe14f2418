import { recordMailPreferencesSchema } from '#shared/types/records'

/** Change record mails: `proposals` each | digest | none (true / false still mean each / none), `decisions`, `comments` on/off. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const { proposals, ...rest } = await readBodyAs(event, recordMailPreferencesSchema)
  const change = { ...rest, ...(proposals === undefined ? {} : { proposalMail: proposals }) }
  const row = await useDB().transaction(async (tx) => {
    const [saved] = await tx.insert(schema.mailPreferences).values({ userId: actor.id, ...change })
      .onConflictDoUpdate({ target: schema.mailPreferences.userId, set: { ...change, updatedAt: new Date() } })
      .returning()
    await audit(event, { actorId: actor.id, action: 'record.mail-preferences-changed', subjectType: 'user', subjectId: actor.id, detail: change }, tx)
    return saved
  })
  return recordMailPreferences(row)
})
