import { idParamSchema } from '#shared/types/account'
import { mergedLobeSchema } from '#shared/types/studies'

/**
 * Save the merged body of a finished study as a new lobe (at the merged bulk density, spinning with
 * the inherited spin period and axis) → 201 lobe; `report.origin` = { kind: 'merged' as const, studyId, … }.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const { id } = paramsAs(event, idParamSchema)
  const { name } = await readBodyAs(event, mergedLobeSchema)
  const row = await loadStudy(useDB(), id)
  const key = studyMeshKeys(row.study.cacheKey).analysis
  const merged = (row.study.result as { merged?: { density?: number, densityA?: number, densityB?: number, spinPeriod?: number | null, spinAxis?: [number, number, number] | null } } | null)?.merged
  if (row.study.status !== 'done' || !merged?.density || !(await (await useMeshStore()).exists(key))) throw createError({ status: 409, statusText: 'Conflict', message: 'This study has no merged body (not finished, or no contact)' })
  // A lobe is homogeneous: a two-density merged body is saved at its bulk density, which keeps
  // its mass but not the centroid and inertia of the study's two-density body.
  const twoDensity = merged.densityA !== undefined && merged.densityB !== undefined && merged.densityA !== merged.densityB
  const extraWarnings = twoDensity
    ? [{ code: 'homogenised-merged-body', message: `Saved at the merged body's bulk density ${merged.density.toPrecision(6)} kg m⁻³; the study modelled lobe A at ${merged.densityA!.toPrecision(6)} and lobe B at ${merged.densityB!.toPrecision(6)} kg m⁻³, so this lobe's centroid, inertia, J2 and C22 differ from the study's merged values.` }]
    : []
  // The merged body keeps the spin it inherited, so its slopes include the rotation.
  const spin = merged.spinPeriod && merged.spinAxis ? { spinPeriodHours: merged.spinPeriod / 3600, spinAxis: merged.spinAxis } : {}
  const origin = { kind: 'merged' as const, studyId: id, studyTitle: row.study.title, density: merged.density, spinPeriodHours: spin.spinPeriodHours ?? null }
  const { lobe, job } = await lobeFromAnalysisMesh(key, { ownerId: actor.id, name: name ?? `${row.a.name} + ${row.b.name} (merged, study ${id})`, fileName: `study-${id}-merged.ply`, density: merged.density, ...spin, extraWarnings, origin })
  await audit(event, { actorId: actor.id, action: 'lobe.from-study', subjectType: 'lobe', subjectId: lobe.id, detail: { study: id } })
  setResponseStatus(event, 201)
  return lobeView(lobe, job, { id: actor.id, name: actor.name })
})
