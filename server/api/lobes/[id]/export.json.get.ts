import { idParamSchema } from '#shared/types/account'

/** The lobe's values with units and provenance, as a download. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const { view } = await loadLobeView(useDB(), id)
  setResponseHeader(event, 'content-disposition', `attachment; filename="lobe-${id}.json"`)
  return {
    ...view,
    units: Object.fromEntries(LOBE_PROPERTY_ROWS.map(r => [r.key, r.unit])),
    provenance: { sourceFileName: view.sourceFileName, sha256: view.sha256, units: view.units, density: view.properties.density, algorithmVersion: view.algorithmVersion, exportedAt: new Date().toISOString() },
  }
})
