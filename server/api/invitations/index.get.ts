import { desc, eq } from 'drizzle-orm'

/** Invitations, newest first (admin). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const rows = await useDB().select({
    id: schema.invitations.id, email: schema.invitations.email, role: schema.invitations.role,
    expiresAt: schema.invitations.expiresAt, acceptedAt: schema.invitations.acceptedAt, revokedAt: schema.invitations.revokedAt,
    createdAt: schema.invitations.createdAt, invitedBy: schema.users.name,
  }).from(schema.invitations).innerJoin(schema.users, eq(schema.users.id, schema.invitations.invitedBy)).orderBy(desc(schema.invitations.id)).limit(200)
  return { items: rows, total: rows.length }
})
