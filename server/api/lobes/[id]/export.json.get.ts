/**
 * The lobe's values with units and provenance, as a download. The provenance states the spin the
 * surface fields were computed with: `spinPeriodS` (s, null when not rotating) and `spin` in words.
 */
export default defineEventHandler(async (event) => {
  const { id, view } = await lobeForExport(event, 'json')
  const spinPeriodS = view.spinPeriodHours ? view.spinPeriodHours * 3600 : null
  setResponseHeader(event, 'content-disposition', `attachment; filename="lobe-${id}.json"`)
  return {
    ...view,
    units: Object.fromEntries([...LOBE_PROPERTY_ROWS, ...LOBE_EXPORT_EXTRA_ROWS].map(r => [r.key, r.unit])),
    /** What each exported quantity means, its frame and assumptions. */
    meanings: Object.fromEntries([...LOBE_PROPERTY_ROWS, ...LOBE_EXPORT_EXTRA_ROWS].map(r => [r.key, r.help])),
    provenance: { sourceFileName: view.sourceFileName, sha256: view.sha256, units: view.units, density: view.properties.density, spinPeriodS, spin: spinPeriodS === null ? 'not rotating' : `rotating, period ${spinPeriodS} s (${view.spinPeriodHours} h)`, algorithmVersion: view.algorithmVersion, exportedAt: new Date().toISOString() },
  }
})
