import { eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'
import { attachmentCommentSchema } from '#shared/types/records'
import { COMMENT_ROLES } from '#shared/types/roles'

/**
 * Comment on an attachment: reviewers discuss a value, analysts answer (admins too); viewers read
 * only. Followers of the record who want comment mails are told.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, COMMENT_ROLES)
  const { id } = paramsAs(event, idParamSchema)
  const { body } = await readBodyAs(event, attachmentCommentSchema)
  const db = useDB()
  const target = await db.select().from(schema.attachments).where(eq(schema.attachments.id, id)).get()
  if (!target) throw notFound('Attachment')
  const row = await db.transaction(async (tx) => {
    const [inserted] = await tx.insert(schema.attachmentComments).values({ attachmentId: id, authorId: actor.id, kind: 'comment', body }).returning()
    await audit(event, { actorId: actor.id, action: 'record.comment-added', subjectType: 'attachment', subjectId: id, detail: { object: target.objectId, comment: inserted!.id } }, tx)
    return inserted
  })
  const record = await db.select({ designation: schema.objects.designation }).from(schema.objects).where(eq(schema.objects.id, target.objectId)).get()
  const names = await memberNames(db, [target.proposedBy, target.reviewedBy, actor.id])
  const to = await mailRecipients(db, { kind: 'comments', followersOf: target.objectId, exclude: actor.id })
  await sendRecordMails(event, to, recordCommentMail({ designation: record?.designation ?? `#${target.objectId}`, author: actor.name, value: attachmentView(target, names), body, link: publicLink(`/objects/${target.objectId}`) }), { action: 'record.comment-added', objectId: target.objectId, attachmentIds: [id] })
  setResponseStatus(event, 201)
  return commentView(row!, names)
})
