import { eq } from 'drizzle-orm'
import { invitationSchema } from '#shared/types/account'

/** Invite someone by e-mail with a role (admin). The one-time link is mailed; only its hash is kept. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'admin')
  const { email, role } = await readBodyAs(event, invitationSchema)
  const db = useDB()
  const existing = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, email)).get()
  if (existing) throw createError({ status: 409, statusText: 'Conflict', message: 'A member with this e-mail already exists' })
  const token = newToken()
  const expiresAt = new Date(Date.now() + useConfig().invitationTtlMs)
  const [row] = await db.insert(schema.invitations).values({ email, role, tokenHash: hashToken(token), invitedBy: actor.id, expiresAt }).returning()
  await sendMail({ to: email, ...invitationMail({ inviter: actor.name, role, link: publicLink(`/join/${token}`), expiresAt }) })
  await audit(event, { actorId: actor.id, action: 'invitation.sent', subjectType: 'invitation', subjectId: row!.id, detail: { email, role } })
  setResponseStatus(event, 201)
  return { id: row!.id, email, role, expiresAt }
})
