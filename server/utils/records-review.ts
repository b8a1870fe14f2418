import type { H3Event } from 'h3'
import { and, asc, eq, gte, inArray, lt, ne, sql, type SQL } from 'drizzle-orm'
import type { Attachment } from '../db/schema'
import type { ReviewQueueQuery } from '#shared/types/records'
import { quantityDef } from '#shared/types/quantities'

type Member = { id: number, name: string }
type Decision = { attachmentId: number, decision: 'accept' | 'reject' }

/** Why a decision was not made, in words, with a code a client can act on. */
export interface Refusal { code: 'own-proposal' | 'not-found' | 'already-decided', reason: string }

export type DecisionResult
  = | { attachmentId: number, outcome: 'accepted' | 'rejected', superseded: number[] }
    | ({ attachmentId: number, outcome: 'refused' } & Refusal)

const OWN = 'You proposed this value: another reviewer must decide it (four-eyes rule)'

/**
 * Decides proposed values, each on its own, in one write transaction: a value is accepted or
 * rejected with a conditional UPDATE … WHERE state = 'proposed' (of two concurrent reviewers exactly
 * one wins), accepting supersedes the current value of the same quantity, subject and reference
 * radius, and every decision is audited with the comment. Values the reviewer proposed, unknown ids
 * and values already decided are refused one by one with the reason; the others go through.
 * `withdrawOwn` lets a proposer reject (withdraw) their own value — the single-value route allows
 * that; a bulk review does not.
 */
export async function decideValues(event: H3Event, actor: Member, decisions: Decision[], comment: string, opts: { withdrawOwn?: boolean } = {}) {
  const db = useDB()
  const a = schema.attachments
  const now = new Date()
  const decided: { row: Attachment, superseded: number[] }[] = []
  const results = await db.transaction(async (tx) => {
    const ids = decisions.map(d => d.attachmentId)
    const found = new Map((await tx.select().from(a).where(inArray(a.id, ids))).map(r => [r.id, r]))
    const out: DecisionResult[] = []
    for (const d of decisions) {
      const target = found.get(d.attachmentId)
      const state = d.decision === 'accept' ? 'accepted' as const : 'rejected' as const
      const refuse = (r: Refusal) => out.push({ attachmentId: d.attachmentId, outcome: 'refused', ...r })
      if (!target) {
        refuse({ code: 'not-found', reason: `No attachment #${d.attachmentId}` })
        continue
      }
      if (target.proposedBy === actor.id && !(opts.withdrawOwn && state === 'rejected')) {
        refuse({ code: 'own-proposal', reason: OWN })
        continue
      }
      let superseded: number[] = []
      if (state === 'accepted') {
        const rows = await tx.update(a).set({ state: 'superseded', supersededBy: target.id, supersededAt: now })
          .where(and(eq(a.objectId, target.objectId), eq(a.supersedeGroup, target.supersedeGroup), eq(a.state, 'accepted'), ne(a.id, target.id),
            sql`exists (select 1 from ${a} t where t.id = ${target.id} and t.state = 'proposed')`))
          .returning({ id: a.id })
        superseded = rows.map(r => r.id)
      }
      const [row] = await tx.update(a).set({ state, reviewedBy: actor.id, reviewedAt: now, reviewComment: comment || null })
        .where(and(eq(a.id, target.id), eq(a.state, 'proposed')))
        .returning()
      if (!row) {
        const current = await tx.select({ state: a.state }).from(a).where(eq(a.id, target.id)).get()
        refuse({ code: 'already-decided', reason: `Attachment #${target.id} was already decided (${current?.state ?? target.state})` })
        continue
      }
      if (comment) await tx.insert(schema.attachmentComments).values({ attachmentId: row.id, authorId: actor.id, kind: 'decision', body: comment, createdAt: now })
      await tx.update(schema.objects).set({ updatedAt: now }).where(eq(schema.objects.id, row.objectId))
      // Audited in the same transaction: a decision is never stored without its audit events.
      await audit(event, { actorId: actor.id, action: `record.value-${state}`, subjectType: 'attachment', subjectId: row.id, detail: { object: row.objectId, quantity: row.quantityKey, subject: row.subject, comment: comment || undefined } }, tx)
      for (const s of superseded) {
        await audit(event, { actorId: actor.id, action: 'record.value-superseded', subjectType: 'attachment', subjectId: s, detail: { object: row.objectId, quantity: row.quantityKey, by: row.id } }, tx)
      }
      decided.push({ row, superseded })
      out.push({ attachmentId: row.id, outcome: state, superseded })
    }
    return out
  })
  const names = await memberNames(db, [actor.id, ...decided.map(d => d.row.proposedBy)])
  const views = new Map(decided.map(d => [d.row.id, attachmentView(d.row, names)]))
  await mailDecisions(event, actor, decided.map(d => ({ row: d.row, view: views.get(d.row.id)!, superseded: d.superseded })), comment)
  return { results, views }
}

/** One mail per proposer with the decisions on their values (for those who want decision mails). */
async function mailDecisions(event: H3Event, actor: Member, decided: { row: Attachment, view: AttachmentView, superseded: number[] }[], comment: string) {
  if (!decided.length) return
  const db = useDB()
  const records = new Map((await db.select({ id: schema.objects.id, designation: schema.objects.designation }).from(schema.objects)
    .where(inArray(schema.objects.id, [...new Set(decided.map(d => d.row.objectId))]))).map(r => [r.id, r.designation]))
  const byProposer = groupBy(decided, d => d.row.proposedBy)
  for (const [proposer, list] of byProposer) {
    const to = await mailRecipients(db, { kind: 'decisions', userIds: [proposer], exclude: actor.id })
    if (!to.length) continue
    const objectIds = [...new Set(list.map(d => d.row.objectId))]
    const link = objectIds.length === 1 ? publicLink(`/objects/${objectIds[0]}`) : publicLink('/objects?awaiting=mine')
    const first = list[0]!
    const mail = list.length === 1
      ? recordDecisionMail({ designation: records.get(first.row.objectId) ?? `#${first.row.objectId}`, reviewer: actor.name, decision: first.row.state as 'accepted' | 'rejected', value: first.view, comment, superseded: first.superseded, link })
      : recordDecisionsMail({ reviewer: actor.name, comment, link, decided: list.map(d => ({ designation: records.get(d.row.objectId) ?? `#${d.row.objectId}`, decision: d.row.state as 'accepted' | 'rejected', value: d.view, superseded: d.superseded })) })
    await sendRecordMails(event, to, mail, { action: 'record.values-decided', objectId: first.row.objectId, attachmentIds: list.map(d => d.row.id) })
  }
}

/**
 * Reviewers and admins (active, not the proposer) by how they want proposal mail; no preference row
 * means a mail for each proposal.
 */
export async function proposalMailMembers(db: DB, mode: 'each' | 'digest', exclude?: number) {
  const u = schema.users
  const p = schema.mailPreferences
  const conditions = [eq(u.active, true), inArray(u.role, ['reviewer', 'admin']), sql`coalesce(${p.proposalMail}, 'each') = ${mode}`]
  if (exclude !== undefined) conditions.push(ne(u.id, exclude))
  return db.select({ id: u.id, email: u.email, name: u.name, digestSentAt: p.digestSentAt, preferenceSince: p.updatedAt }).from(u).leftJoin(p, eq(p.userId, u.id)).where(and(...conditions))
}

/** Mails each proposed value to every reviewer and admin who wants a mail for each proposal (any record). */
export async function mailProposals(event: H3Event, opts: { objectId: number, designation: string, proposer: Member, values: (AttachmentView & { subjectWarning: string | null })[] }) {
  const to = await proposalMailMembers(useDB(), 'each', opts.proposer.id)
  if (!to.length) return
  for (const v of opts.values) {
    const mail = recordProposalMail({ designation: opts.designation, proposer: opts.proposer.name, value: v, link: publicLink(`/objects/${opts.objectId}`), queueLink: publicLink(`/reviews?record=${opts.objectId}`) })
    await sendRecordMails(event, to, mail, { action: 'record.value-proposed', objectId: opts.objectId, attachmentIds: [v.id] })
  }
}

/** A day: digest members get at most one digest per this interval unless forced. */
const DIGEST_EVERY_MS = 24 * 3600_000

/**
 * Sends the proposal digest to each member who chose it: the values proposed since their last
 * digest (at most a day back for a first digest) that still await review and that they may decide
 * (not their own). Nobody gets an empty digest. Runs on the server's schedule (see the
 * records-digest plugin) and from `POST /api/reviews/digest` (admins, tests).
 * @param opts.force send even if the member's last digest is less than a day old
 * @returns the members mailed and how many values each digest listed
 */
export async function sendProposalDigests(event: H3Event | null, opts: { force?: boolean, now?: Date } = {}) {
  const db = useDB()
  const now = opts.now ?? new Date()
  const members = await proposalMailMembers(db, 'digest')
  const sent: { memberId: number, values: number }[] = []
  for (const m of members) {
    if (!opts.force && m.digestSentAt && +now - +m.digestSentAt < DIGEST_EVERY_MS - 60_000) continue
    const since = m.digestSentAt ?? new Date(+now - DIGEST_EVERY_MS)
    const a = schema.attachments
    const rows = await db.select().from(a)
      .where(and(eq(a.state, 'proposed'), ne(a.proposedBy, m.id), gte(a.proposedAt, since), lt(a.proposedAt, now)))
      .orderBy(asc(a.objectId), asc(a.id))
    if (rows.length) {
      const names = await memberNames(db, rows.map(r => r.proposedBy))
      const warnings = await subjectWarnings(db, rows)
      const records = new Map((await db.select({ id: schema.objects.id, designation: schema.objects.designation }).from(schema.objects)
        .where(inArray(schema.objects.id, [...new Set(rows.map(r => r.objectId))]))).map(r => [r.id, r.designation]))
      const byRecord = groupBy(rows, r => r.objectId)
      const mail = recordDigestMail({
        since,
        queueLink: publicLink('/reviews'),
        records: [...byRecord].map(([objectId, list]) => ({
          designation: records.get(objectId) ?? `#${objectId}`,
          link: publicLink(`/objects/${objectId}`),
          values: list.map(r => ({ ...attachmentView(r, names), subjectWarning: warnings.get(r.id) ?? null, proposer: names.get(r.proposedBy) ?? `member #${r.proposedBy}` })),
        })),
      })
      await sendRecordMails(event, [m], mail, { action: 'record.proposal-digest', objectId: rows[0]!.objectId, attachmentIds: rows.map(r => r.id) })
      sent.push({ memberId: m.id, values: rows.length })
    }
    await db.insert(schema.mailPreferences).values({ userId: m.id, proposalMail: 'digest', digestSentAt: now })
      .onConflictDoUpdate({ target: schema.mailPreferences.userId, set: { digestSentAt: now } })
  }
  return { sent, at: now.toISOString() }
}

/** Entries by key, in first-seen order (Map.groupBy needs Node 21). */
function groupBy<T, K>(list: T[], key: (t: T) => K): Map<K, T[]> {
  const out = new Map<K, T[]>()
  for (const t of list) {
    const k = key(t)
    const bucket = out.get(k)
    if (bucket) bucket.push(t)
    else out.set(k, [t])
  }
  return out
}

const AGE_MS = { day: 24 * 3600_000, week: 7 * 24 * 3600_000, month: 30 * 24 * 3600_000 }

/**
 * The review queue: proposed values the caller may decide (not their own), across records, oldest
 * first, filtered by record, quantity, proposer and age, with the subject warning of each and the
 * choices for the filters. Also says how many of the caller's own proposals wait for someone else.
 */
export async function reviewQueue(db: DB, actor: Member, query: ReviewQueueQuery) {
  const a = schema.attachments
  const now = Date.now()
  const mayDecide: SQL[] = [eq(a.state, 'proposed'), ne(a.proposedBy, actor.id)]
  const where = [...mayDecide]
  if (query.record) where.push(eq(a.objectId, query.record))
  if (query.quantity) where.push(eq(a.quantityKey, query.quantity))
  if (query.proposer) where.push(eq(a.proposedBy, query.proposer))
  if (query.age === 'day') where.push(gte(a.proposedAt, new Date(now - AGE_MS.day)))
  if (query.age === 'week') where.push(gte(a.proposedAt, new Date(now - AGE_MS.week)))
  if (query.age === 'older-than-week') where.push(lt(a.proposedAt, new Date(now - AGE_MS.week)))
  if (query.age === 'older-than-month') where.push(lt(a.proposedAt, new Date(now - AGE_MS.month)))
  const [rows, total, records, quantities, proposers, own] = await Promise.all([
    db.select().from(a).where(and(...where)).orderBy(asc(a.proposedAt), asc(a.id)).limit(query.limit).offset(query.offset),
    db.select({ n: sql<number>`count(*)` }).from(a).where(and(...where)).get(),
    db.select({ id: schema.objects.id, designation: schema.objects.designation, n: sql<number>`count(*)` }).from(a)
      .innerJoin(schema.objects, eq(schema.objects.id, a.objectId)).where(and(...mayDecide)).groupBy(schema.objects.id).orderBy(asc(sql`${schema.objects.designation} collate nocase`)),
    db.select({ key: a.quantityKey, n: sql<number>`count(*)` }).from(a).where(and(...mayDecide)).groupBy(a.quantityKey).orderBy(asc(a.quantityKey)),
    db.select({ id: schema.users.id, name: schema.users.name, n: sql<number>`count(*)` }).from(a)
      .innerJoin(schema.users, eq(schema.users.id, a.proposedBy)).where(and(...mayDecide)).groupBy(schema.users.id).orderBy(asc(schema.users.name)),
    db.select({ n: sql<number>`count(*)` }).from(a).where(and(eq(a.state, 'proposed'), eq(a.proposedBy, actor.id))).get(),
  ])
  const names = await memberNames(db, rows.map(r => r.proposedBy))
  const warnings = await subjectWarnings(db, rows)
  const designations = new Map(records.map(r => [r.id, r.designation]))
  return {
    items: rows.map(r => ({
      ...attachmentView(r, names),
      designation: designations.get(r.objectId) ?? `#${r.objectId}`,
      subjectWarning: warnings.get(r.id) ?? null,
      /** Hours since it was proposed. */
      waitingHours: Math.max(0, (now - +r.proposedAt) / 3600_000),
    })),
    total: Number(total?.n ?? 0),
    limit: query.limit,
    offset: query.offset,
    filters: {
      records: records.map(r => ({ id: r.id, designation: r.designation, count: Number(r.n) })),
      quantities: quantities.map(q => ({ key: q.key, label: quantityDef(q.key)?.label ?? q.key, count: Number(q.n) })),
      proposers: proposers.map(p => ({ id: p.id, name: p.name, count: Number(p.n) })),
    },
    ownAwaiting: Number(own?.n ?? 0),
  }
}
