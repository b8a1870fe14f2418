import { and, eq, gt, isNull } from 'drizzle-orm'

/** A pending (unused, unrevoked, unexpired) invitation for a token, or undefined. */
export function findPendingInvitation(db: Pick<DB, 'select'>, token: string) {
  return db.select().from(schema.invitations).where(and(
    eq(schema.invitations.tokenHash, hashToken(token)),
    isNull(schema.invitations.acceptedAt),
    isNull(schema.invitations.revokedAt),
    gt(schema.invitations.expiresAt, new Date()),
  )).get()
}

/** A usable password-reset row for a token, or undefined. */
export function findPendingReset(db: Pick<DB, 'select'>, token: string) {
  return db.select().from(schema.passwordResets).where(and(
    eq(schema.passwordResets.tokenHash, hashToken(token)),
    isNull(schema.passwordResets.usedAt),
    gt(schema.passwordResets.expiresAt, new Date()),
  )).get()
}

export function linkGone(what: string) {
  return createError({ status: 410, statusText: 'Gone', message: `This ${what} link is unknown, already used or expired` })
}
