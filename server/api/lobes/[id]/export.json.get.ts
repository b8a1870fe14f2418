/** The lobe's values with units and provenance, as a download. */
export default defineEventHandler(async (event) => {
  const { id, view } = await lobeForExport(event, 'json')
  setResponseHeader(event, 'content-disposition', `attachment; filename="lobe-${id}.json"`)
  return {
    ...view,
    units: Object.fromEntries(LOBE_PROPERTY_ROWS.map(r => [r.key, r.unit])),
    provenance: { sourceFileName: view.sourceFileName, sha256: view.sha256, units: view.units, density: view.properties.density, algorithmVersion: view.algorithmVersion, exportedAt: new Date().toISOString() },
  }
})
