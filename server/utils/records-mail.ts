import { recordSpreadNote, recordSpreadText } from '#shared/utils/records-export'
import { significantText } from '#shared/utils/number-text'

interface MailValue { id: number, label: string, subjectLabel: string, value: number | number[], unit: string, spread: Record<string, number | string> | null, referenceRadius: number | null }

/** Mails show 6 significant digits; the record page and its exports carry full precision. */
const readable = (v: number) => significantText(v, 6)

function line(v: MailValue): string {
  const spread = recordSpreadText(v.spread, readable)
  const r = v.referenceRadius === null ? '' : ` (reference radius ${readable(v.referenceRadius)} m)`
  const note = recordSpreadNote(v.value, v.spread, v.unit, readable)
  const value = Array.isArray(v.value) ? `[${v.value.map(readable).join(', ')}]` : readable(v.value)
  return `- #${v.id} ${v.label}, ${v.subjectLabel}: ${value} ${v.unit}${spread ? ` ${spread}` : ''}${r}${note ? `\n    Note: ${note}` : ''}`
}

const FOOTER = [
  '',
  'Values are model estimates under stated assumptions (density, homogeneity, mesh as given), not measurements.',
  'Numbers here are rounded to 6 significant digits; the record page and its exports carry full precision.',
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
