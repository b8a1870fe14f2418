import { eq } from 'drizzle-orm'
import { idParamSchema } from '#shared/types/account'
import { lobeHarmonicsQuerySchema } from '#shared/types/gravity'

/**
 * Gravity-field coefficients of the lobe (homogeneous polyhedron at its density) to degree N
 * (default 16, at most 64): `{ degree, referenceRadius, GM, frame, normalization, C, S, Cbar, Sbar }`
 * with C[l][m], S[l][m] unnormalised and Cbar, Sbar 4π-normalised; `format=csv|txt` for a CSV or a
 * fixed-width text table whose header states the same. Computed on the workers the first time
 * (seconds for a million faces at degree 32), then kept.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const q = queryAs(event, lobeHarmonicsQuerySchema)
  const lobe = await useDB().select().from(schema.lobes).where(eq(schema.lobes.id, id)).get()
  if (!lobe) throw notFound('Lobe')
  const co = await lobeHarmonics(lobe, q.degree, q.frame, q.referenceRadius).catch((error) => { throw toHttpError(error) })
  if (actor.via === 'token' && q.format !== 'json') await audit(event, { actorId: actor.id, action: 'lobe.exported', subjectType: 'lobe', subjectId: id, detail: { format: `harmonics-${q.format}`, token: actor.tokenId } })
  if (q.format === 'csv') {
    setResponseHeaders(event, { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': `attachment; filename="lobe-${id}-harmonics-${q.degree}.csv"` })
    return harmonicsCsv(lobe, co)
  }
  if (q.format === 'txt') {
    setResponseHeaders(event, { 'content-type': 'text/plain; charset=utf-8', 'content-disposition': `attachment; filename="lobe-${id}-harmonics-${q.degree}.txt"` })
    return harmonicsText(lobe, co)
  }
  return { lobeId: id, ...co, units: { referenceRadius: 'm', GM: 'm^3 s^-2', density: 'kg m^-3', C: '1', S: '1', Cbar: '1', Sbar: '1' } }
})
