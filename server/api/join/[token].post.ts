import { and, eq, isNull } from 'drizzle-orm'
import { acceptInvitationSchema, tokenParamSchema } from '#shared/types/account'

/** Accept an invitation: set name and password, become a member, get signed in. The link works once. */
export default defineEventHandler(async (event) => {
  const { token } = paramsAs(event, tokenParamSchema)
  const { name, password } = await readBodyAs(event, acceptInvitationSchema)
  const db = useDB()
  const inv = await findPendingInvitation(db, token)
  if (!inv) throw linkGone('invitation')
  const passwordHash = await hashPassword(password)
  const user = await db.transaction(async (tx) => {
    // The conditional update makes a second use of the same link lose the race.
    const claimed = await tx.update(schema.invitations).set({ acceptedAt: new Date() })
      .where(and(eq(schema.invitations.id, inv.id), isNull(schema.invitations.acceptedAt))).returning({ id: schema.invitations.id })
    if (!claimed.length) return undefined
    const taken = await tx.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, inv.email)).get()
    if (taken) throw createError({ status: 409, statusText: 'Conflict', message: 'A member with this e-mail already exists' })
    const [u] = await tx.insert(schema.users).values({ email: inv.email, name, role: inv.role, passwordHash, lastSignInAt: new Date() }).returning()
    await tx.update(schema.invitations).set({ acceptedUserId: u!.id }).where(eq(schema.invitations.id, inv.id))
    await audit(event, { actorId: u!.id, action: 'invitation.accepted', subjectType: 'invitation', subjectId: inv.id, detail: { email: inv.email, role: inv.role } }, tx)
    return u
  })
  if (!user) throw linkGone('invitation')
  await startSession(event, user)
  return { user: memberView(user) }
})
