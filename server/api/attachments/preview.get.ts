import { eq } from 'drizzle-orm'
import { attachPreviewQuerySchema } from '#shared/types/records'
import { quantitiesFor, readQuantity, QuantityReadError, RECORD_SUBJECT_LABELS } from '#shared/types/quantities'
import { suggestLobeSubject } from '#shared/utils/records-subjects'

/**
 * What could be attached from a lobe (`?lobe=`) or a study (`?study=`): every catalogue quantity of
 * that source with the value it would freeze, or why it is unavailable, and a suggested subject —
 * for a lobe always one lobe ("this lobe", lobe A or B, from the record given as `?object=` when
 * there is one), never the whole body; for a study the lobe pair (approach). The attach dialog
 * shows the suggestion; the person confirms it.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const query = queryAs(event, attachPreviewQuerySchema)
  const db = useDB()
  let source: unknown
  let kind: 'lobe' | 'study'
  let title: string
  let suggested: { subject: string, label: string, reason: string }
  if (query.lobe !== undefined) {
    const lobe = await db.select().from(schema.lobes).where(eq(schema.lobes.id, query.lobe)).get()
    if (!lobe) throw notFound('Lobe')
    source = { properties: lobe.properties, surface: lobe.surface }
    kind = 'lobe'
    title = `${lobe.name} (${lobe.sourceFileName}, ${lobe.density} kg m⁻³)`
    const ctx = query.object === undefined ? null : (await recordSubjectContexts(db, [query.object])).get(query.object)!
    const s = suggestLobeSubject(lobe, ctx)
    suggested = { subject: s.subject, label: `${RECORD_SUBJECT_LABELS[s.subject]} — this lobe, “${lobe.name}”`, reason: s.reason }
  }
  else {
    const study = await db.select().from(schema.studies).where(eq(schema.studies.id, query.study!)).get()
    if (!study) throw notFound('Study')
    source = study.status === 'done' ? study.result : null
    kind = 'study'
    title = study.title ?? `Study #${study.id}`
    suggested = { subject: 'lobe-pair', label: RECORD_SUBJECT_LABELS['lobe-pair'], reason: 'the contact quantities describe the two lobes on their approach; the neck and merged-body quantities have their own subjects' }
  }
  return {
    source: kind,
    title,
    suggested,
    items: quantitiesFor(kind).map((def) => {
      const base = { key: def.key, label: def.label, unit: def.unit, subject: def.subject ?? null, components: def.components ?? null, note: def.note ?? null }
      try {
        const q = readQuantity(def, source)
        return { ...base, available: true, value: q.value, spread: q.spread, referenceRadius: q.referenceRadius, reason: null }
      }
      catch (error) {
        if (!(error instanceof QuantityReadError)) throw error
        return { ...base, available: false, value: null, spread: null, referenceRadius: null, reason: error.message }
      }
    }),
  }
})
