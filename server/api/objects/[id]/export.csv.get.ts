import { recordCsv } from '#shared/utils/records-export'

/** The current (accepted) values as CSV: one row per scalar or vector component, numbers at full float64 precision. */
export default defineEventHandler(async (event) => {
  const data = await recordForExport(event, 'csv')
  setResponseHeader(event, 'Content-Type', 'text/csv; charset=utf-8')
  setResponseHeader(event, 'Content-Disposition', `attachment; filename="${recordFileName(data.object.designation)}.csv"`)
  return recordCsv(data)
})
