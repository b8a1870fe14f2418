import { ROLE_LABELS, type Role } from '#shared/types/roles'

/** Every mail's subject starts with this, so people can filter Isthmus mail. */
export const MAIL_SUBJECT_PREFIX = '[Isthmus]'

const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December']

/** A moment in UTC, for people: "9 December 2026, 03:16 UTC" (minutes; no locale dependence). */
export function readableUtc(d: Date): string {
  const pad = (n: number) => String(n).padStart(2, '0')
  return `${d.getUTCDate()} ${MONTHS[d.getUTCMonth()]} ${d.getUTCFullYear()}, ${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())} UTC`
}

export function invitationMail(opts: { inviter: string, role: Role, link: string, expiresAt: Date }) {
  return {
    subject: `${MAIL_SUBJECT_PREFIX} You are invited to an Isthmus team`,
    text: [
      `${opts.inviter} invites you to join their Isthmus team as ${ROLE_LABELS[opts.role]}.`,
      '',
      'Choose your name and password here (the link works once):',
      opts.link,
      '',
      `The link expires on ${readableUtc(opts.expiresAt)}.`,
      'If you did not expect this invitation, ignore this mail.',
    ].join('\n'),
  }
}

export function passwordResetMail(opts: { link: string, expiresAt: Date }) {
  return {
    subject: `${MAIL_SUBJECT_PREFIX} Reset your password`,
    text: [
      'Someone (hopefully you) asked to reset the password of this Isthmus account.',
      '',
      'Choose a new password here (the link works once):',
      opts.link,
      '',
      `The link expires on ${readableUtc(opts.expiresAt)}.`,
      'If you did not ask for this, ignore this mail: your password stays as it is.',
    ].join('\n'),
  }
}
