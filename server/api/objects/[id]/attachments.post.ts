import { and, eq, inArray, isNull } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'
import { attachSchema } from '#shared/types/records'
import { quantityDef, readQuantity, supersedeGroup, QuantityReadError, RECORD_SUBJECT_LABELS, type RecordSubject } from '#shared/types/quantities'

/**
 * Attach derived values to a record (analyst): `{ lobe, subject?, quantities }` or
 * `{ study, quantities }`. Each value is frozen as a snapshot (value at full float64 precision,
 * unit, spread, subject, reference radius, provenance) in the state `proposed`. Followers who review
 * are mailed; a mail failure is logged and audited and never loses the attachments.
 * A value identical to one still awaiting review on this record (same quantity, subject, source lobe
 * or study, reference radius and value) answers 409 and nothing is stored: a repeated click or a
 * re-sent request cannot file duplicates.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const { id } = paramsAs(event, idParamSchema)
  const body = await readBodyAs(event, attachSchema)
  const db = useDB()
  const record = await db.select().from(schema.objects).where(eq(schema.objects.id, id)).get()
  if (!record) throw recordNotFound()
  const now = new Date()

  let source: unknown
  let provenance: Record<string, unknown>
  let link: { lobeId?: number, studyId?: number }
  let lobeSubject: RecordSubject | undefined
  if ('lobe' in body) {
    const lobe = await db.select().from(schema.lobes).where(eq(schema.lobes.id, body.lobe)).get()
    if (!lobe) throw unprocessable('Unknown lobe', [{ path: 'lobe', message: `No lobe #${body.lobe}` }])
    source = { properties: lobe.properties, surface: lobe.surface }
    provenance = lobeProvenance(lobe, actor, now)
    link = { lobeId: lobe.id }
    lobeSubject = body.subject
  }
  else {
    const study = await db.select().from(schema.studies).where(eq(schema.studies.id, body.study)).get()
    if (!study) throw unprocessable('Unknown study', [{ path: 'study', message: `No study #${body.study}` }])
    if (study.status !== 'done' || !study.result) throw unprocessable('The study has no result yet', [{ path: 'study', message: `Study #${study.id} is ${study.status}` }], 'study-not-done')
    const pair = await db.select().from(schema.lobes).where(inArray(schema.lobes.id, [study.lobeAId, study.lobeBId]))
    source = study.result
    provenance = studyProvenance(study, pair.find(l => l.id === study.lobeAId), pair.find(l => l.id === study.lobeBId), actor, now)
    link = { studyId: study.id }
  }

  const issues: { path: string, message: string }[] = []
  const snapshots = body.quantities.flatMap((key, i) => {
    const def = quantityDef(key)!
    const wanted = 'lobe' in body ? 'lobe' : 'study'
    if (def.source !== wanted) {
      issues.push({ path: `quantities.${i}`, message: `${key} is read from a ${def.source}, not a ${wanted}` })
      return []
    }
    try {
      const q = readQuantity(def, source)
      const subject = def.subject ?? lobeSubject!
      return [{ ...q, subject, group: supersedeGroup(key, subject, q.referenceRadius) }]
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
      eq(a.objectId, id), eq(a.state, 'proposed'), inArray(a.quantityKey, snapshots.map(s => s.key)),
      link.lobeId !== undefined ? eq(a.lobeId, link.lobeId) : isNull(a.lobeId),
      link.studyId !== undefined ? eq(a.studyId, link.studyId) : isNull(a.studyId),
    ))
    const same = snapshots.flatMap(s => pending.filter(p => p.quantityKey === s.key && p.subject === s.subject
      && p.referenceRadius === s.referenceRadius && JSON.stringify(p.value) === JSON.stringify(s.value)))
    if (same.length) {
      const list = same.map(p => `#${p.id} ${quantityDef(p.quantityKey)?.label ?? p.quantityKey} (${RECORD_SUBJECT_LABELS[p.subject as RecordSubject] ?? p.subject})`).join(', ')
      throw createError({ status: 409, statusText: 'Conflict', message: `Already awaiting review on this record with the same value from the same ${'lobe' in body ? 'lobe' : 'study'}: ${list}. Nothing was proposed.`, data: { code: 'duplicate-proposal', attachments: same.map(p => p.id) } })
    }
    const inserted = await tx.insert(schema.attachments).values(snapshots.map(s => ({
      objectId: id,
      quantityKey: s.key,
      subject: s.subject,
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
    await ensureLink(tx, id, link, 'attachment', actor.id)
    await tx.insert(schema.objectFollows).values({ objectId: id, userId: actor.id }).onConflictDoNothing()
    await tx.update(schema.objects).set({ updatedAt: now }).where(eq(schema.objects.id, id))
    // Audited in the same transaction: no value is stored without its audit event.
    for (const r of inserted) {
      await audit(event, { actorId: actor.id, action: 'record.value-proposed', subjectType: 'attachment', subjectId: r.id, detail: { object: id, quantity: r.quantityKey, subject: r.subject, ...link } }, tx)
    }
    return inserted
  })
  const names = new Map([[actor.id, actor.name]])
  const items = rows.map(r => attachmentView(r, names))

  const reviewers = await mailRecipients(db, { kind: 'proposals', followersOf: id, roles: ['reviewer', 'admin'], exclude: actor.id })
  await sendRecordMails(event, reviewers, recordProposalMail({ designation: record.designation, proposer: actor.name, values: items, link: publicLink(`/objects/${id}`) }), { action: 'record.value-proposed', objectId: id, attachmentIds: rows.map(r => r.id) })

  setResponseStatus(event, 201)
  return { items }
})
