import { eq } from 'drizzle-orm'
import { attachPreviewQuerySchema } from '#shared/types/records'
import { quantitiesFor, readQuantity, QuantityReadError } from '#shared/types/quantities'

/**
 * What could be attached from a lobe (`?lobe=`) or a study (`?study=`): every catalogue quantity of
 * that source with the value it would freeze, or why it is unavailable. Used by the attach dialog.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const query = queryAs(event, attachPreviewQuerySchema)
  const db = useDB()
  let source: unknown
  let kind: 'lobe' | 'study'
  let title: string
  if ('lobe' in query) {
    const lobe = await db.select().from(schema.lobes).where(eq(schema.lobes.id, query.lobe)).get()
    if (!lobe) throw notFound('Lobe')
    source = { properties: lobe.properties, surface: lobe.surface }
    kind = 'lobe'
    title = `${lobe.name} (${lobe.sourceFileName}, ${lobe.density} kg m⁻³)`
  }
  else {
    const study = await db.select().from(schema.studies).where(eq(schema.studies.id, query.study)).get()
    if (!study) throw notFound('Study')
    source = study.status === 'done' ? study.result : null
    kind = 'study'
    title = study.title ?? `Study #${study.id}`
  }
  return {
    source: kind,
    title,
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
