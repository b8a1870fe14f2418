import { and, eq, isNull } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'

/** Withdraw a pending invitation (admin). */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'admin')
  const { id } = paramsAs(event, idParamSchema)
  await useDB().transaction(async (tx) => {
    const [row] = await tx.update(schema.invitations).set({ revokedAt: new Date() })
      .where(and(eq(schema.invitations.id, id), isNull(schema.invitations.acceptedAt), isNull(schema.invitations.revokedAt))).returning()
    if (!row) throw notFound('Pending invitation')
    await audit(event, { actorId: actor.id, action: 'invitation.revoked', subjectType: 'invitation', subjectId: id }, tx)
  })
  return { ok: true }
})
