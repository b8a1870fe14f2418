import { recordSpreadNote, recordSpreadText } from '#shared/utils/records-export'
import { significantText } from '#shared/utils/number-text'

interface MailValue { id: number, label: string, subjectLabel: string, value: number | number[], unit: string, spread: Record<string, number | string> | null, referenceRadius: number | null, subjectWarning?: string | null }

/** Mails show 6 significant digits; the record page and its exports carry full precision. */
const readable = (v: number) => significantText(v, 6)

function line(v: MailValue): string {
  const spread = recordSpreadText(v.spread, readable)
  const r = v.referenceRadius === null ? '' : ` (reference radius ${readable(v.referenceRadius)} m)`
  const note = recordSpreadNote(v.value, v.spread, v.unit, readable)
  const value = Array.isArray(v.value) ? `[${v.value.map(readable).join(', ')}]` : readable(v.value)
  const warning = v.subjectWarning ? `\n    Check the subject: ${v.subjectWarning}` : ''
  return `- #${v.id} [${v.subjectLabel.toUpperCase()}] ${v.label}: ${value} ${v.unit}${spread ? ` ${spread}` : ''}${r}${note ? `\n    Note: ${note}` : ''}${warning}`
}

const FOOTER = [
  '',
  'Values are model estimates under stated assumptions (density, homogeneity, mesh as given), not measurements.',
  'Numbers here are rounded to 6 significant digits; the record page and its exports carry full precision.',
  'You get this mail because of your record mail settings (Account → Record mails).',
]

/** One proposed value, for reviewers who want a mail for each proposal: the subject leads the mail's subject line. */
export function recordProposalMail(opts: { designation: string, proposer: string, value: MailValue, link: string, queueLink: string }) {
  const v = opts.value
  return {
    subject: `[Isthmus] Review ${opts.designation} — ${v.subjectLabel}: ${v.label} (#${v.id})`,
    text: [
      `${opts.proposer} proposed a value for the record ${opts.designation}, waiting for review.`,
      `It describes: ${v.subjectLabel}.`,
      '',
      line(v),
      '',
      'Review it on the record:',
      opts.link,
      'or with everything else waiting for you in the review queue:',
      opts.queueLink,
      ...FOOTER,
    ].join('\n'),
  }
}

/** The daily digest: values proposed since the last digest that still await review, by record. */
export function recordDigestMail(opts: { since: Date, records: { designation: string, link: string, values: (MailValue & { proposer: string })[] }[], queueLink: string }) {
  const n = opts.records.reduce((k, r) => k + r.values.length, 0)
  return {
    subject: `[Isthmus] Digest: ${n} value${n === 1 ? '' : 's'} awaiting review on ${opts.records.length} record${opts.records.length === 1 ? '' : 's'}`,
    text: [
      `Values proposed since ${readableUtc(opts.since)} that still await review:`,
      ...opts.records.flatMap(r => ['', `${r.designation} (${r.link})`, ...r.values.map(v => `${line(v)}\n    proposed by ${v.proposer}`)]),
      '',
      'Decide them together in the review queue:',
      opts.queueLink,
      ...FOOTER,
    ].join('\n'),
  }
}

/** Decisions of one bulk review on one proposer's values, in one mail. */
export function recordDecisionsMail(opts: { reviewer: string, decided: { designation: string, decision: 'accepted' | 'rejected', value: MailValue, superseded: number[] }[], comment: string, link: string }) {
  const accepted = opts.decided.filter(d => d.decision === 'accepted')
  const rejected = opts.decided.filter(d => d.decision === 'rejected')
  const part = (list: typeof accepted, what: string) => (list.length
    ? ['', `${what}:`, ...list.map(d => `${line(d.value)}\n    on ${d.designation}${d.superseded.length ? `; replaces #${d.superseded.join(', #')} (kept in the history)` : ''}`)]
    : [])
  return {
    subject: `[Isthmus] Your values: ${accepted.length} accepted, ${rejected.length} rejected by ${opts.reviewer}`,
    text: [
      `${opts.reviewer} decided ${opts.decided.length} of your proposed values.`,
      ...part(accepted, 'Accepted'),
      ...part(rejected, 'Rejected'),
      '',
      opts.comment ? `Comment: ${opts.comment}` : 'No comment given.',
      '',
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
