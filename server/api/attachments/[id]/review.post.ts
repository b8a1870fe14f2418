import { and, eq, ne, sql } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'
import { attachmentReviewSchema } from '#shared/types/records'

/**
 * Accept or reject a proposed value (reviewer). The decision is one conditional UPDATE … WHERE
 * state = 'proposed' inside a write transaction, so of two concurrent reviewers exactly one wins;
 * the other (and any later decision) answers 409. Accepting supersedes the current accepted value
 * of the same quantity, subject and reference radius (it stays in the history). Nobody accepts a
 * value they proposed (403); rejecting one's own proposal withdraws it.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'reviewer')
  const { id } = paramsAs(event, idParamSchema)
  const { decision, comment } = await readBodyAs(event, attachmentReviewSchema)
  const db = useDB()
  const a = schema.attachments
  const now = new Date()
  const state = decision === 'accept' ? 'accepted' as const : 'rejected' as const

  const outcome = await db.transaction(async (tx) => {
    const target = await tx.select().from(a).where(eq(a.id, id)).get()
    if (!target) throw notFound('Attachment')
    if (target.state !== 'proposed') throw recordConflict(`Attachment #${id} was already decided (${target.state})`)
    // Four eyes: a value is accepted by someone other than the member who proposed it.
    if (state === 'accepted' && target.proposedBy === actor.id) {
      throw createError({ status: 403, statusText: 'Forbidden', message: 'You proposed this value: another reviewer must accept it (you can reject it to withdraw it)' })
    }
    let superseded: number[] = []
    if (state === 'accepted') {
      const rows = await tx.update(a).set({ state: 'superseded', supersededBy: id, supersededAt: now })
        .where(and(eq(a.objectId, target.objectId), eq(a.supersedeGroup, target.supersedeGroup), eq(a.state, 'accepted'), ne(a.id, id),
          sql`exists (select 1 from ${a} t where t.id = ${id} and t.state = 'proposed')`))
        .returning({ id: a.id })
      superseded = rows.map(r => r.id)
    }
    const [decided] = await tx.update(a).set({ state, reviewedBy: actor.id, reviewedAt: now, reviewComment: comment || null })
      .where(and(eq(a.id, id), eq(a.state, 'proposed')))
      .returning()
    if (!decided) throw recordConflict(`Attachment #${id} was already decided`)
    if (comment) await tx.insert(schema.attachmentComments).values({ attachmentId: id, authorId: actor.id, kind: 'decision', body: comment, createdAt: now })
    await tx.update(schema.objects).set({ updatedAt: now }).where(eq(schema.objects.id, decided.objectId))
    // Audited in the same transaction: a decision is never stored without its audit events.
    await audit(event, { actorId: actor.id, action: `record.value-${state}`, subjectType: 'attachment', subjectId: id, detail: { object: decided.objectId, quantity: decided.quantityKey, subject: decided.subject, comment: comment || undefined } }, tx)
    for (const s of superseded) {
      await audit(event, { actorId: actor.id, action: 'record.value-superseded', subjectType: 'attachment', subjectId: s, detail: { object: decided.objectId, quantity: decided.quantityKey, by: id } }, tx)
    }
    return { decided, superseded }
  })
  const { decided, superseded } = outcome

  const names = await memberNames(db, [decided.proposedBy, actor.id])
  const view = attachmentView(decided, names)
  const record = await db.select({ designation: schema.objects.designation }).from(schema.objects).where(eq(schema.objects.id, decided.objectId)).get()
  const to = await mailRecipients(db, { kind: 'decisions', userIds: [decided.proposedBy], exclude: actor.id })
  await sendRecordMails(event, to, recordDecisionMail({ designation: record?.designation ?? `#${decided.objectId}`, reviewer: actor.name, decision: state, value: view, comment, superseded, link: publicLink(`/objects/${decided.objectId}`) }), { action: `record.value-${state}`, objectId: decided.objectId, attachmentIds: [id] })
  return { attachment: view, superseded }
})
