import type { H3Event } from 'h3'
import { and, asc, desc, eq, inArray, ne, sql } from 'drizzle-orm'
import type { Attachment, AttachmentComment, Lobe, ObjectRecord, Study } from '../db/schema'
import { quantityDef, RECORD_SUBJECT_LABELS, type RecordSubject } from '#shared/types/quantities'
import type { RecordMailKind, HeliocentricOrbit, ProposalMailMode, RecordMailPreferences } from '#shared/types/records'
import { idParamSchema } from '#shared/types/account'
import { recordSpreadNote } from '#shared/utils/records-export'

/** Printed with every record, export and citation: the values are model estimates. */
export const RECORD_CAUTIONS = [
  'Every value is a model estimate under stated assumptions, never a measurement.',
  'Lobe values assume a homogeneous interior at the stated bulk density and take the mesh as the exact surface; mesh resolution, patched holes, porosity and density contrasts change them.',
  'Gravity coefficients (J2, C22, …) are meaningful only with their reference radius and normalisation.',
  'Study values depend on the chosen approach (relative orbit, orientation) and the lobe densities; a spread, where given, covers only the inputs that were varied.',
]

type Named = { id: number, name: string } | null

export function objectView(o: ObjectRecord) {
  const orbit: HeliocentricOrbit | null = o.orbitAAu !== null && o.orbitE !== null && o.orbitIDeg !== null
    ? { semiMajorAxisAu: o.orbitAAu, eccentricity: o.orbitE, inclinationDeg: o.orbitIDeg }
    : null
  return {
    id: o.id,
    designation: o.designation,
    name: o.name,
    population: o.population,
    notes: o.notes,
    orbit,
    tags: o.tags,
    createdBy: o.createdBy,
    createdAt: o.createdAt,
    updatedAt: o.updatedAt,
  }
}

export function attachmentView(a: Attachment, names: Map<number, string>) {
  const def = quantityDef(a.quantityKey)
  const named = (id: number | null): Named => (id === null ? null : { id, name: names.get(id) ?? `member #${id}` })
  return {
    id: a.id,
    objectId: a.objectId,
    quantityKey: a.quantityKey,
    label: def?.label ?? a.quantityKey,
    components: def?.components ?? null,
    subject: a.subject,
    subjectLabel: RECORD_SUBJECT_LABELS[a.subject as RecordSubject] ?? a.subject,
    value: a.value,
    unit: a.unit,
    spread: a.spread,
    /** Plain note when a study spread is not centred on the value (it sampled other inputs), else ''. */
    spreadNote: recordSpreadNote(a.value, a.spread, a.unit),
    /** m; null for quantities without one. */
    referenceRadius: a.referenceRadius,
    source: a.lobeId !== null ? { type: 'lobe' as const, id: a.lobeId } : { type: 'study' as const, id: a.studyId },
    provenance: a.provenance,
    note: a.note,
    state: a.state,
    proposedBy: named(a.proposedBy),
    proposedAt: a.proposedAt,
    reviewedBy: named(a.reviewedBy),
    reviewedAt: a.reviewedAt,
    reviewComment: a.reviewComment,
    supersededBy: a.supersededBy,
    supersededAt: a.supersededAt,
  }
}
export type AttachmentView = ReturnType<typeof attachmentView>

export function commentView(c: AttachmentComment, names: Map<number, string>) {
  return { id: c.id, attachmentId: c.attachmentId, kind: c.kind, body: c.body, author: { id: c.authorId, name: names.get(c.authorId) ?? `member #${c.authorId}` }, createdAt: c.createdAt }
}

export async function memberNames(db: DB, ids: Iterable<number | null | undefined>): Promise<Map<number, string>> {
  const list = [...new Set([...ids].filter((i): i is number => typeof i === 'number'))]
  if (!list.length) return new Map()
  const rows = await db.select({ id: schema.users.id, name: schema.users.name }).from(schema.users).where(inArray(schema.users.id, list))
  return new Map(rows.map(r => [r.id, r.name]))
}

/**
 * One timeline entry of a record's history, newest first. The oldest entry is the record's creation
 * (`created`, no attachment); `edited` entries come from the audit trail (fields changed).
 */
export interface HistoryEvent {
  at: Date
  kind: 'created' | 'edited' | 'proposed' | 'accepted' | 'rejected' | 'superseded' | 'comment'
  attachmentId: number | null
  quantityKey: string | null
  subject: string | null
  by: Named
  detail?: string
}

function historyOf(o: ObjectRecord, names: Map<number, string>, edits: { at: Date, by: number | null, fields: string[] }[], items: AttachmentView[], comments: ReturnType<typeof commentView>[]): HistoryEvent[] {
  const named = (id: number | null): Named => (id === null ? null : { id, name: names.get(id) ?? `member #${id}` })
  const none = { attachmentId: null, quantityKey: null, subject: null }
  const events: HistoryEvent[] = [{ ...none, at: o.createdAt, kind: 'created', by: named(o.createdBy), detail: `record ${o.designation} (${o.name}) created` }]
  for (const e of edits) events.push({ ...none, at: e.at, kind: 'edited', by: named(e.by), detail: e.fields.length ? `changed ${e.fields.join(', ')}` : undefined })
  for (const a of items) {
    const base = { attachmentId: a.id, quantityKey: a.quantityKey, subject: a.subject }
    events.push({ ...base, at: a.proposedAt, kind: 'proposed', by: a.proposedBy })
    if (a.reviewedAt) {
      // A superseded value was accepted first.
      const decided = a.state === 'rejected' ? 'rejected' : 'accepted'
      events.push({ ...base, at: a.reviewedAt, kind: decided, by: a.reviewedBy, detail: a.reviewComment ?? undefined })
    }
    if (a.state === 'superseded' && a.supersededAt) {
      events.push({ ...base, at: a.supersededAt, kind: 'superseded', by: null, detail: `by attachment #${a.supersededBy}` })
    }
  }
  const byId = new Map(items.map(a => [a.id, a]))
  for (const c of comments) {
    if (c.kind !== 'comment') continue
    const a = byId.get(c.attachmentId)!
    events.push({ at: c.createdAt, kind: 'comment', attachmentId: c.attachmentId, quantityKey: a.quantityKey, subject: a.subject, by: c.author, detail: c.body })
  }
  const order = { created: -1, edited: 0, proposed: 0, accepted: 1, rejected: 1, superseded: 2, comment: 3 }
  // Creation stays last (oldest) even when a seeded value carries the same instant.
  return events.sort((x, y) => (x.kind === 'created' ? 1 : 0) - (y.kind === 'created' ? 1 : 0) || +y.at - +x.at
    || (y.attachmentId ?? 0) - (x.attachmentId ?? 0) || order[y.kind] - order[x.kind])
}

/**
 * Everything the record page shows (and the JSON export carries): the record, its links, the
 * current (accepted) values, every attachment ever made with its state, the comment threads and
 * the history timeline.
 * @returns undefined when the record does not exist
 */
export async function loadRecord(db: DB, id: number, viewerId?: number) {
  const o = await db.select().from(schema.objects).where(eq(schema.objects.id, id)).get()
  if (!o) return undefined
  const [rows, comments, links, followers, edits] = await Promise.all([
    db.select().from(schema.attachments).where(eq(schema.attachments.objectId, id)).orderBy(desc(schema.attachments.id)),
    db.select().from(schema.attachmentComments)
      .innerJoin(schema.attachments, eq(schema.attachments.id, schema.attachmentComments.attachmentId))
      .where(eq(schema.attachments.objectId, id)).orderBy(asc(schema.attachmentComments.id)),
    db.select({
      lobeId: schema.objectLinks.lobeId, studyId: schema.objectLinks.studyId, via: schema.objectLinks.via,
      lobeName: schema.lobes.name, studyTitle: schema.studies.title,
    }).from(schema.objectLinks)
      .leftJoin(schema.lobes, eq(schema.lobes.id, schema.objectLinks.lobeId))
      .leftJoin(schema.studies, eq(schema.studies.id, schema.objectLinks.studyId))
      .where(eq(schema.objectLinks.objectId, id)).orderBy(asc(schema.objectLinks.id)),
    db.select({ userId: schema.objectFollows.userId }).from(schema.objectFollows).where(eq(schema.objectFollows.objectId, id)),
    db.select({ at: schema.auditEvents.createdAt, by: schema.auditEvents.actorId, detail: schema.auditEvents.detail }).from(schema.auditEvents)
      .where(and(eq(schema.auditEvents.action, 'record.updated'), eq(schema.auditEvents.subjectType, 'object'), eq(schema.auditEvents.subjectId, String(id)))),
  ])
  const names = await memberNames(db, [o.createdBy, ...rows.flatMap(a => [a.proposedBy, a.reviewedBy]), ...comments.map(c => c.attachment_comments.authorId), ...edits.map(e => e.by)])
  const [changes, warnings] = await Promise.all([sourceChanges(db, rows), subjectWarnings(db, rows)])
  const items = rows.map(a => ({ ...attachmentView(a, names), subjectWarning: warnings.get(a.id) ?? null, sourceChanges: changes.get(a.id) ?? [] }))
  const commentViews = comments.map(c => commentView(c.attachment_comments, names))
  const thread: Record<number, ReturnType<typeof commentView>[]> = {}
  for (const c of commentViews) (thread[c.attachmentId] ??= []).push(c)
  const current = items.filter(a => a.state === 'accepted')
    .sort((x, y) => x.quantityKey.localeCompare(y.quantityKey) || x.subject.localeCompare(y.subject) || (x.referenceRadius ?? 0) - (y.referenceRadius ?? 0))
  return {
    object: { ...objectView(o), createdByName: names.get(o.createdBy) ?? null },
    links: {
      lobes: links.filter(l => l.lobeId !== null).map(l => ({ id: l.lobeId!, name: l.lobeName, via: l.via })),
      studies: links.filter(l => l.studyId !== null).map(l => ({ id: l.studyId!, title: l.studyTitle, via: l.via })),
    },
    currentValues: current,
    attachments: items,
    comments: thread,
    history: historyOf(o, names, edits.map(e => ({ at: e.at, by: e.by, fields: Array.isArray(e.detail?.fields) ? e.detail.fields as string[] : [] })), items, commentViews),
    followerCount: followers.length,
    following: viewerId !== undefined && followers.some(f => f.userId === viewerId),
    cautions: RECORD_CAUTIONS,
  }
}
export type RecordData = NonNullable<Awaited<ReturnType<typeof loadRecord>>>

/**
 * What changed in the source lobes since each value was attached (density, reference radius,
 * spin, mesh file), from the frozen provenance against the lobes as they are now: the values stay
 * as frozen, but a reviewer should know that re-attaching would give other numbers.
 */
async function sourceChanges(db: DB, rows: Attachment[]): Promise<Map<number, string[]>> {
  type Frozen = { id?: number, name?: string, densityKgM3?: number, referenceRadiusM?: number | null, spinPeriodHours?: number | null, sha256?: string }
  const frozen = (a: Attachment): [string, Frozen][] => {
    const p = a.provenance as { lobe?: Frozen, lobeA?: Frozen, lobeB?: Frozen }
    return p.lobe ? [['the lobe', p.lobe]] : [['lobe A', p.lobeA ?? {}], ['lobe B', p.lobeB ?? {}]]
  }
  const ids = [...new Set(rows.flatMap(a => frozen(a).map(([, l]) => l.id)).filter((i): i is number => typeof i === 'number'))]
  const now = new Map((ids.length ? await db.select().from(schema.lobes).where(inArray(schema.lobes.id, ids)) : []).map(l => [l.id, l]))
  const out = new Map<number, string[]>()
  for (const a of rows) {
    const list: string[] = []
    for (const [who, f] of frozen(a)) {
      const l = f.id === undefined ? undefined : now.get(f.id)
      if (!l) continue
      const name = `${who} (#${l.id} ${l.name})`
      if (f.densityKgM3 !== undefined && f.densityKgM3 !== l.density) list.push(`${name}: density ${f.densityKgM3} → ${l.density} kg m⁻³`)
      if (f.referenceRadiusM !== undefined && (f.referenceRadiusM ?? null) !== (l.referenceRadius ?? null)) list.push(`${name}: reference radius ${f.referenceRadiusM ?? 'volume-equivalent'} → ${l.referenceRadius ?? 'volume-equivalent'} (m)`)
      if (f.spinPeriodHours !== undefined && (f.spinPeriodHours ?? null) !== (l.spinPeriodHours ?? null)) list.push(`${name}: spin period ${f.spinPeriodHours ?? 'none'} → ${l.spinPeriodHours ?? 'none'} (h)`)
      if (f.sha256 !== undefined && f.sha256 !== l.sha256) list.push(`${name}: mesh file changed`)
    }
    if (list.length) out.set(a.id, list)
  }
  return out
}

function lobeBlock(l: Lobe) {
  return {
    id: l.id,
    name: l.name,
    sourceFileName: l.sourceFileName,
    sha256: l.sha256,
    format: l.format,
    fileUnits: l.units,
    vertexCount: l.vertexCount,
    faceCount: l.faceCount,
    /** kg m⁻³ */
    densityKgM3: l.density,
    /** m; null → the volume-equivalent radius */
    referenceRadiusM: l.referenceRadius,
    spinPeriodHours: l.spinPeriodHours,
    algorithmVersion: l.algorithmVersion,
    createdAt: l.createdAt,
  }
}

/** Frozen provenance of a value attached from a lobe. */
export function lobeProvenance(l: Lobe, actor: { id: number, name: string }, at: Date) {
  return {
    source: 'lobe',
    lobe: lobeBlock(l),
    algorithmVersion: l.algorithmVersion,
    softwareVersion: useRuntimeConfig().version,
    assumptions: 'Homogeneous interior at the stated bulk density; the mesh is taken as the exact surface.',
    attachedBy: { id: actor.id, name: actor.name },
    attachedAt: at.toISOString(),
  }
}

/** Frozen provenance of a value attached from a study: both meshes, densities, the study inputs (approach) and versions. */
export function studyProvenance(s: Study, a: Lobe | undefined, b: Lobe | undefined, actor: { id: number, name: string }, at: Date) {
  return {
    source: 'study',
    study: { id: s.id, title: s.title, input: s.input, cacheKey: s.cacheKey, algorithmVersion: s.algorithmVersion, finishedAt: s.finishedAt },
    lobeA: a ? lobeBlock(a) : { id: s.lobeAId },
    lobeB: b ? lobeBlock(b) : { id: s.lobeBId },
    algorithmVersion: s.algorithmVersion,
    softwareVersion: useRuntimeConfig().version,
    assumptions: 'Homogeneous lobes at the stated densities, meshes taken as exact, the approach as given in the study inputs.',
    attachedBy: { id: actor.id, name: actor.name },
    attachedAt: at.toISOString(),
  }
}

export function recordNotFound() {
  return notFound('Object record')
}

export function recordConflict(message: string) {
  return createError({ status: 409, statusText: 'Conflict', message })
}

/** Makes sure a record is linked to a lobe or study (idempotent). */
export async function ensureLink(db: Pick<DB, 'insert'>, objectId: number, link: { lobeId?: number, studyId?: number }, via: 'manual' | 'attachment', userId: number) {
  await db.insert(schema.objectLinks).values({ objectId, lobeId: link.lobeId ?? null, studyId: link.studyId ?? null, via, linkedBy: userId }).onConflictDoNothing()
}

/** Replaces the tag rows of a record (the JSON column holds the same list). */
export async function writeTags(db: Pick<DB, 'insert' | 'delete'>, objectId: number, tags: string[]) {
  await db.delete(schema.objectTags).where(eq(schema.objectTags.objectId, objectId))
  if (tags.length) await db.insert(schema.objectTags).values(tags.map(tag => ({ objectId, tag })))
}

/** Replaces the manual links of a record; links made by attachments stay. Unknown ids answer 422. */
export async function writeManualLinks(db: DB, objectId: number, userId: number, lobeIds: number[] | undefined, studyIds: number[] | undefined) {
  if (lobeIds) {
    const found = lobeIds.length ? await db.select({ id: schema.lobes.id }).from(schema.lobes).where(inArray(schema.lobes.id, lobeIds)) : []
    const missing = lobeIds.filter(i => !found.some(f => f.id === i))
    if (missing.length) throw unprocessable('Unknown lobe', missing.map(m => ({ path: `lobes.${lobeIds.indexOf(m)}`, message: `No lobe #${m}` })))
    await db.delete(schema.objectLinks).where(and(eq(schema.objectLinks.objectId, objectId), eq(schema.objectLinks.via, 'manual'), sql`${schema.objectLinks.lobeId} is not null`))
    for (const id of lobeIds) await ensureLink(db, objectId, { lobeId: id }, 'manual', userId)
  }
  if (studyIds) {
    const found = studyIds.length ? await db.select({ id: schema.studies.id }).from(schema.studies).where(inArray(schema.studies.id, studyIds)) : []
    const missing = studyIds.filter(i => !found.some(f => f.id === i))
    if (missing.length) throw unprocessable('Unknown study', missing.map(m => ({ path: `studies.${studyIds.indexOf(m)}`, message: `No study #${m}` })))
    await db.delete(schema.objectLinks).where(and(eq(schema.objectLinks.objectId, objectId), eq(schema.objectLinks.via, 'manual'), sql`${schema.objectLinks.studyId} is not null`))
    for (const id of studyIds) await ensureLink(db, objectId, { studyId: id }, 'manual', userId)
  }
}

/** A designation already in use (case-insensitive) answers 409. */
export function isDesignationClash(error: unknown): boolean {
  const e = error as { cause?: { message?: string, code?: string }, message?: string }
  return /objects_designation_unique|UNIQUE constraint failed: objects\./i.test(`${e?.cause?.message ?? ''} ${e?.message ?? ''}`)
}

/**
 * Members who want a record mail of `kind`: active, preference on (no row = on), optionally only
 * followers of a record and only some roles, never the member who caused it.
 */
export async function mailRecipients(db: DB, opts: { kind: RecordMailKind, followersOf?: number, userIds?: number[], roles?: string[], exclude: number }) {
  const u = schema.users
  const p = schema.mailPreferences
  const conditions = [eq(u.active, true), ne(u.id, opts.exclude), sql`coalesce(${p[opts.kind]}, 1) = 1`]
  if (opts.roles) conditions.push(inArray(u.role, opts.roles as never[]))
  if (opts.userIds) conditions.push(inArray(u.id, opts.userIds.length ? opts.userIds : [-1]))
  if (opts.followersOf !== undefined) {
    conditions.push(sql`exists (select 1 from object_follows f where f.object_id = ${opts.followersOf} and f.user_id = users.id)`)
  }
  return db.select({ id: u.id, email: u.email, name: u.name }).from(u).leftJoin(p, eq(p.userId, u.id)).where(and(...conditions))
}

/** A member's record mail choices as the account page shows them (no stored row: the defaults). */
export function recordMailPreferences(row: { proposalMail: ProposalMailMode, decisions: boolean, comments: boolean } | undefined): RecordMailPreferences {
  return { proposals: row?.proposalMail ?? 'each', decisions: row?.decisions ?? true, comments: row?.comments ?? true }
}

/**
 * Sends record mails one by one. A failure is logged and audited and never undoes the change that
 * caused the mail (the attachment or review is already committed).
 */
export async function sendRecordMails(event: H3Event | null, to: { id: number, email: string }[], mail: { subject: string, text: string }, context: { action: string, objectId: number, attachmentIds: number[] }) {
  for (const r of to) {
    try {
      await sendMail({ to: r.email, subject: mail.subject, text: mail.text })
    }
    catch (error) {
      const message = error instanceof Error ? error.message : String(error)
      console.error(`[isthmus] record mail to member #${r.id} failed (${context.action}):`, message)
      await audit(event, { actorId: null, action: 'record.mail-failed', subjectType: 'object', subjectId: context.objectId, detail: { to: r.id, about: context.action, attachments: context.attachmentIds, error: message.slice(0, 300) } })
        .catch(e => console.error('[isthmus] could not audit a failed mail:', e))
    }
  }
}

/**
 * Loads a record for an export route (viewer): an export made with an API token is audited.
 * @throws 404 when the record does not exist
 */
export async function recordForExport(event: H3Event, format: 'json' | 'csv' | 'txt' | 'bibtex' | 'csl-json') {
  const actor = await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const data = await loadRecord(useDB(), id)
  if (!data) throw recordNotFound()
  if (actor.via === 'token') {
    await audit(event, { actorId: actor.id, action: 'record.exported', subjectType: 'object', subjectId: id, detail: { format, token: actor.tokenId } })
  }
  const { following: _following, ...rest } = data
  return rest
}

/** A file name from a designation: letters, digits, dashes. */
export function recordFileName(designation: string): string {
  return `isthmus-${designation.normalize('NFKD').replace(/[^\w-]+/g, '-').replace(/^-+|-+$/g, '') || 'record'}`
}
