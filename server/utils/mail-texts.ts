import { ROLE_LABELS, type Role } from '../../shared/types/roles'

export function invitationMail(opts: { inviter: string, role: Role, link: string, expiresAt: Date }) {
  return {
    subject: 'You are invited to an Isthmus team',
    text: [
      `${opts.inviter} invites you to join their Isthmus team as ${ROLE_LABELS[opts.role]}.`,
      '',
      'Choose your name and password here (the link works once):',
      opts.link,
      '',
      `The link expires on ${opts.expiresAt.toISOString()} (UTC).`,
      'If you did not expect this invitation, ignore this mail.',
    ].join('\n'),
  }
}

export function passwordResetMail(opts: { link: string, expiresAt: Date }) {
  return {
    subject: 'Reset your Isthmus password',
    text: [
      'Someone (hopefully you) asked to reset the password of this Isthmus account.',
      '',
      'Choose a new password here (the link works once):',
      opts.link,
      '',
      `The link expires on ${opts.expiresAt.toISOString()} (UTC).`,
      'If you did not ask for this, ignore this mail: your password stays as it is.',
    ].join('\n'),
  }
}
