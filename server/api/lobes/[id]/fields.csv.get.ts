import { Readable } from 'node:stream'
import { faceFieldsCsv } from '#shared/utils/face-fields-file'

/**
 * Every face's surface fields as CSV, streamed: `# ` comment lines with the conventions, then
 * face (0-based index in the analysis mesh), centroid (m, file frame), area (m²) and each field with
 * its unit in the column name. 409 while the fields are being computed.
 */
export default defineEventHandler(async (event) => {
  const { lobe, file } = await lobeFieldsForExport(event, 'csv')
  setResponseHeaders(event, { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': `attachment; filename="lobe-${lobe.id}-fields.csv"` })
  return sendStream(event, Readable.from(faceFieldsCsv(file, fieldExportComments(lobe, file))))
})
