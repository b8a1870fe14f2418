import { csvRow } from '#shared/utils/csv'

/**
 * The lobe's property table as CSV: quantity, value, unit (one row per component), with the inputs on
 * every row: density and the spin the surface fields (slope, geopotential) were computed with —
 * `spin_period_s` (empty when not rotating) and `spin` ("not rotating" or "rotating"). After the
 * page's rows come the inertia tensor, the frames, the file-frame degree-2 set and the harmonics.
 */
export default defineEventHandler(async (event) => {
  const { id, view } = await lobeForExport(event, 'csv')
  const props = view.properties as Record<string, unknown>
  const spinS = view.spinPeriodHours ? view.spinPeriodHours * 3600 : null
  const lines = [csvRow(['quantity', 'value', 'unit', 'lobe', 'sha256', 'density_kg_m3', 'algorithm_version', 'spin_period_s', 'spin'])]
  for (const row of [...LOBE_PROPERTY_ROWS, ...LOBE_EXPORT_EXTRA_ROWS]) {
    for (const cell of flattenValue(row.key, props[row.key])) {
      lines.push(csvRow([cell.key, cell.value, row.unit, view.name, view.sha256, view.properties.density, view.algorithmVersion, spinS, spinS === null ? 'not rotating' : 'rotating']))
    }
  }
  setResponseHeaders(event, { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': `attachment; filename="lobe-${id}.csv"` })
  return `${lines.join('\r\n')}\r\n`
})
