import { eq } from 'drizzle-orm'
import { invitationSchema } from '#shared/types/account'

/**
 * Invite someone by e-mail with a role (admin). The one-time link is mailed; only its hash is kept.
 * When the mail cannot be sent the invitation is withdrawn and the answer is 502.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'admin')
  const { email, role } = await readBodyAs(event, invitationSchema)
  const db = useDB()
  const existing = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, email)).get()
  if (existing) throw createError({ status: 409, statusText: 'Conflict', message: 'A member with this e-mail already exists' })
  const token = newToken()
  const expiresAt = new Date(Date.now() + useConfig().invitationTtlMs)
  const row = await db.transaction(async (tx) => {
    const [created] = await tx.insert(schema.invitations).values({ email, role, tokenHash: hashToken(token), invitedBy: actor.id, expiresAt }).returning()
    await audit(event, { actorId: actor.id, action: 'invitation.sent', subjectType: 'invitation', subjectId: created!.id, detail: { email, role } }, tx)
    return created
  })
  try {
    await sendMail({ to: email, ...invitationMail({ inviter: actor.name, role, link: publicLink(`/join/${token}`), expiresAt }) })
  }
  catch (error) {
    // Nobody received the link: withdraw the invitation, so that the list shows nothing pending.
    const message = error instanceof Error ? error.message : String(error)
    await db.transaction(async (tx) => {
      await tx.update(schema.invitations).set({ revokedAt: new Date() }).where(eq(schema.invitations.id, row!.id))
      await audit(event, { actorId: actor.id, action: 'invitation.mail-failed', subjectType: 'invitation', subjectId: row!.id, detail: { email, error: message.slice(0, 300) } }, tx)
    })
    throw createError({ status: 502, statusText: 'Bad Gateway', message: `The invitation e-mail to ${email} could not be sent (${message.slice(0, 200)}); the invitation was withdrawn, try again later` })
  }
  setResponseStatus(event, 201)
  return { id: row!.id, email, role, expiresAt }
})
