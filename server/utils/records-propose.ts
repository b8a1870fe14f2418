import type { H3Event } from 'h3'
import { and, eq, inArray, isNotNull, isNull, ne } from 'drizzle-orm'
import type { AttachRequest } from '#shared/types/records'
import { quantityDef, readQuantity, supersedeGroup, QuantityReadError, RECORD_SUBJECT_LABELS, type RecordSubject } from '#shared/types/quantities'
import { recordSubjectWarning, type RecordSubjectContext } from '#shared/utils/records-subjects'

/**
 * What each record says about its lobes (linked lobes, linked studies with their lobe A and B, the
 * subjects values from each lobe were filed under), for the subject checks and suggestions.
 */
export async function recordSubjectContexts(db: DB, objectIds: number[]): Promise<Map<number, RecordSubjectContext>> {
  const out = new Map<number, RecordSubjectContext>(objectIds.map(id => [id, { lobeIds: [], studies: [], filings: [] }]))
  if (!objectIds.length) return out
  const l = schema.objectLinks
  const a = schema.attachments
  const [links, filings] = await Promise.all([
    db.select({ objectId: l.objectId, lobeId: l.lobeId, studyId: l.studyId, lobeAId: schema.studies.lobeAId, lobeBId: schema.studies.lobeBId })
      .from(l).leftJoin(schema.studies, eq(schema.studies.id, l.studyId)).where(inArray(l.objectId, objectIds)),
    db.select({ objectId: a.objectId, attachmentId: a.id, lobeId: a.lobeId, subject: a.subject }).from(a)
      .where(and(inArray(a.objectId, objectIds), isNotNull(a.lobeId), ne(a.state, 'rejected'))),
  ])
  for (const k of links) {
    const ctx = out.get(k.objectId)!
    if (k.lobeId !== null) ctx.lobeIds.push(k.lobeId)
    if (k.studyId !== null && k.lobeAId !== null && k.lobeBId !== null) ctx.studies.push({ id: k.studyId, lobeAId: k.lobeAId, lobeBId: k.lobeBId })
  }
  for (const f of filings) out.get(f.objectId)!.filings.push({ attachmentId: f.attachmentId, lobeId: f.lobeId!, subject: f.subject })
  return out
}

/** The subject warning of each attachment (by id), against its record as it is now. */
export async function subjectWarnings(db: DB, rows: { id: number, objectId: number, subject: string, lobeId: number | null }[]): Promise<Map<number, string>> {
  const contexts = await recordSubjectContexts(db, [...new Set(rows.filter(r => r.lobeId !== null).map(r => r.objectId))])
  const out = new Map<number, string>()
  for (const r of rows) {
    const ctx = contexts.get(r.objectId)
    const w = ctx ? recordSubjectWarning(r, ctx) : null
    if (w) out.set(r.id, w)
  }
  return out
}

/**
 * Files derived values on a record as proposals (analyst): each value frozen as a snapshot (value at
 * full float64 precision, unit, spread, the subject stated in the request, reference radius,
 * provenance) in the state `proposed`, linked, followed by the proposer and audited in one
 * transaction; then every reviewer and admin who wants a mail for each proposal gets one per value.
 * @throws 404 unknown record; 422 unknown lobe or study, a study without result, a quantity the
 *   source cannot give or that does not describe the stated subject; 409 the same value already
 *   awaits review on this record (nothing is stored)
 */
export async function proposeValues(event: H3Event, actor: { id: number, name: string }, objectId: number, body: AttachRequest) {
  const db = useDB()
  const record = await db.select().from(schema.objects).where(eq(schema.objects.id, objectId)).get()
  if (!record) throw recordNotFound()
  const now = new Date()
  const from = body.lobe !== undefined ? 'lobe' as const : 'study' as const

  let source: unknown
  let provenance: Record<string, unknown>
  let link: { lobeId?: number, studyId?: number }
  if (body.lobe !== undefined) {
    const lobe = await db.select().from(schema.lobes).where(eq(schema.lobes.id, body.lobe)).get()
    if (!lobe) throw unprocessable('Unknown lobe', [{ path: 'lobe', message: `No lobe #${body.lobe}` }])
    source = { properties: lobe.properties, surface: lobe.surface }
    provenance = lobeProvenance(lobe, actor, now)
    link = { lobeId: lobe.id }
  }
  else {
    const study = await db.select().from(schema.studies).where(eq(schema.studies.id, body.study!)).get()
    if (!study) throw unprocessable('Unknown study', [{ path: 'study', message: `No study #${body.study}` }])
    if (study.status !== 'done' || !study.result) throw unprocessable('The study has no result yet', [{ path: 'study', message: `Study #${study.id} is ${study.status}` }], 'study-not-done')
    const pair = await db.select().from(schema.lobes).where(inArray(schema.lobes.id, [study.lobeAId, study.lobeBId]))
    source = study.result
    provenance = studyProvenance(study, pair.find(l => l.id === study.lobeAId), pair.find(l => l.id === study.lobeBId), actor, now)
    link = { studyId: study.id }
  }

  const subject = body.subject as RecordSubject
  const issues: { path: string, message: string }[] = []
  const snapshots = body.quantities.flatMap((key, i) => {
    const def = quantityDef(key)!
    if (def.source !== from) {
      issues.push({ path: `quantities.${i}`, message: `${key} is read from a ${def.source}, not a ${from}` })
      return []
    }
    if (def.subject && def.subject !== subject) {
      issues.push({ path: `quantities.${i}`, message: `${def.label} describes the ${RECORD_SUBJECT_LABELS[def.subject]}, not the ${RECORD_SUBJECT_LABELS[subject]}: propose it with that subject` })
      return []
    }
    try {
      const q = readQuantity(def, source)
      return [{ ...q, group: supersedeGroup(key, subject, q.referenceRadius) }]
    }
    catch (error) {
      if (!(error instanceof QuantityReadError)) throw error
      issues.push({ path: `quantities.${i}`, message: error.message })
      return []
    }
  })
  if (issues.length) throw unprocessable(`Cannot attach: ${issues.map(i => i.message).join('; ')}`, issues, 'quantity-unavailable')

  const rows = await db.transaction(async (tx) => {
    const a = schema.attachments
    const pending = await tx.select().from(a).where(and(
      eq(a.objectId, objectId), eq(a.state, 'proposed'), inArray(a.quantityKey, snapshots.map(s => s.key)),
      link.lobeId !== undefined ? eq(a.lobeId, link.lobeId) : isNull(a.lobeId),
      link.studyId !== undefined ? eq(a.studyId, link.studyId) : isNull(a.studyId),
    ))
    const same = snapshots.flatMap(s => pending.filter(p => p.quantityKey === s.key && p.subject === subject
      && p.referenceRadius === s.referenceRadius && JSON.stringify(p.value) === JSON.stringify(s.value)))
    if (same.length) {
      const list = same.map(p => `#${p.id} ${quantityDef(p.quantityKey)?.label ?? p.quantityKey} (${RECORD_SUBJECT_LABELS[p.subject as RecordSubject] ?? p.subject})`).join(', ')
      throw createError({ status: 409, statusText: 'Conflict', message: `Already awaiting review on this record with the same value from the same ${from}: ${list}. Nothing was proposed.`, data: { code: 'duplicate-proposal', attachments: same.map(p => p.id) } })
    }
    const inserted = await tx.insert(a).values(snapshots.map(s => ({
      objectId,
      quantityKey: s.key,
      subject,
      value: s.value,
      unit: s.unit,
      spread: s.spread,
      referenceRadius: s.referenceRadius,
      supersedeGroup: s.group,
      lobeId: link.lobeId ?? null,
      studyId: link.studyId ?? null,
      provenance,
      note: body.note,
      proposedBy: actor.id,
      proposedAt: now,
    }))).returning()
    await ensureLink(tx, objectId, link, 'attachment', actor.id)
    await tx.insert(schema.objectFollows).values({ objectId, userId: actor.id }).onConflictDoNothing()
    await tx.update(schema.objects).set({ updatedAt: now }).where(eq(schema.objects.id, objectId))
    // Audited in the same transaction: no value is stored without its audit event.
    for (const r of inserted) {
      await audit(event, { actorId: actor.id, action: 'record.value-proposed', subjectType: 'attachment', subjectId: r.id, detail: { object: objectId, quantity: r.quantityKey, subject: r.subject, ...link } }, tx)
    }
    return inserted
  })
  const warnings = await subjectWarnings(db, rows)
  const names = new Map([[actor.id, actor.name]])
  const items = rows.map(r => ({ ...attachmentView(r, names), subjectWarning: warnings.get(r.id) ?? null }))
  await mailProposals(event, { objectId, designation: record.designation, proposer: actor, values: items })
  return { items }
}
