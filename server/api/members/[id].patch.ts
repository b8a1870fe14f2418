import { idParamSchema, memberUpdateSchema } from '#shared/types/account'
import { and, eq, ne } from 'drizzle-orm'

/**
 * Change a member's role or deactivate/reactivate them (admin). Data is never deleted. Deactivation
 * ends the member's sessions and revokes their API tokens for good: re-activating revives neither.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'admin')
  const { id } = paramsAs(event, idParamSchema)
  const change = await readBodyAs(event, memberUpdateSchema)
  // One write transaction: the last-admin check, the change and its audit events (two admins
  // demoting each other at once cannot leave the team without one).
  const user = await useDB().transaction(async (tx) => {
    if (id === actor.id && (change.active === false || (change.role && change.role !== 'admin'))) {
      // Keeps at least one admin able to manage the team.
      const others = await tx.select({ id: schema.users.id }).from(schema.users)
        .where(and(eq(schema.users.role, 'admin'), eq(schema.users.active, true), ne(schema.users.id, actor.id))).get()
      if (!others) throw createError({ status: 409, statusText: 'Conflict', message: 'You are the only active admin: make someone else admin first' })
    }
    const before = await tx.select().from(schema.users).where(eq(schema.users.id, id)).get()
    if (!before) throw notFound('Member')
    const [after] = await tx.update(schema.users).set(change).where(eq(schema.users.id, id)).returning()
    if (change.role && change.role !== before.role) {
      await audit(event, { actorId: actor.id, action: 'member.role-changed', subjectType: 'user', subjectId: id, detail: { from: before.role, to: change.role } }, tx)
    }
    if (change.active === false && before.active) {
      await endSessions(tx, id)
      await revokeTokens(tx, id)
    }
    if (change.active !== undefined && change.active !== before.active) {
      await audit(event, { actorId: actor.id, action: change.active ? 'member.reactivated' : 'member.deactivated', subjectType: 'user', subjectId: id }, tx)
    }
    return after!
  })
  return memberView(user)
})
