import { recordSpreadNote, recordSpreadText, recordValueText } from '../../shared/utils/records-export'

interface MailValue { id: number, label: string, subjectLabel: string, value: number | number[], unit: string, spread: Record<string, number | string> | null, referenceRadius: number | null }

function line(v: MailValue): string {
  const spread = recordSpreadText(v.spread)
  const r = v.referenceRadius === null ? '' : ` (reference radius ${v.referenceRadius} m)`
  const note = recordSpreadNote(v.value, v.spread, v.unit)
  return `- #${v.id} ${v.label}, ${v.subjectLabel}: ${recordValueText(v.value)} ${v.unit}${spread ? ` ${spread}` : ''}${r}${note ? `\n    Note: ${note}` : ''}`
}

const FOOTER = [
  '',
  'Values are model estimates under stated assumptions (density, homogeneity, mesh as given), not measurements.',
  'You get this mail because of your record mail settings (Account → Record mails).',
]

export function recordProposalMail(opts: { designation: string, proposer: string, values: MailValue[], link: string }) {
  return {
    subject: `[Isthmus] ${opts.values.length} value${opts.values.length === 1 ? '' : 's'} proposed for ${opts.designation}`,
    text: [
      `${opts.proposer} proposed ${opts.values.length === 1 ? 'a value' : 'values'} for the record ${opts.designation}, waiting for review:`,
      '',
      ...opts.values.map(line),
      '',
      'Review them here:',
      opts.link,
      ...FOOTER,
    ].join('\n'),
  }
}

export function recordDecisionMail(opts: { designation: string, reviewer: string, decision: 'accepted' | 'rejected', value: MailValue, comment: string, superseded: number[], link: string }) {
  return {
    subject: `[Isthmus] Your value for ${opts.designation} was ${opts.decision}`,
    text: [
      `${opts.reviewer} ${opts.decision} your value for the record ${opts.designation}:`,
      '',
      line(opts.value),
      '',
      opts.comment ? `Comment: ${opts.comment}` : 'No comment given.',
      ...(opts.superseded.length ? [`It replaces the earlier accepted value${opts.superseded.length > 1 ? 's' : ''} #${opts.superseded.join(', #')} (kept in the history).`] : []),
      '',
      opts.link,
      ...FOOTER,
    ].join('\n'),
  }
}

export function recordCommentMail(opts: { designation: string, author: string, value: MailValue, body: string, link: string }) {
  return {
    subject: `[Isthmus] New comment on a value of ${opts.designation}`,
    text: [
      `${opts.author} commented on a value of the record ${opts.designation}:`,
      '',
      line(opts.value),
      '',
      opts.body,
      '',
      opts.link,
      ...FOOTER,
    ].join('\n'),
  }
}
