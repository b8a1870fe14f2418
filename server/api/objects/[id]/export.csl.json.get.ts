/**
 * CSL-JSON of the accepted values (one `dataset` item each, written by citation-js), for reference
 * managers: the provenance in `note` and, structured at full float64 precision, in `custom.isthmus`.
 */
export default defineEventHandler(async (event) => {
  const data = await recordForExport(event, 'csl-json')
  setResponseHeader(event, 'Content-Type', 'application/vnd.citationstyles.csl+json; charset=utf-8')
  setResponseHeader(event, 'Content-Disposition', `attachment; filename="${recordFileName(data.object.designation)}.csl.json"`)
  return recordCslJson(data, { link: publicLink(`/objects/${data.object.id}`), exportedAt: new Date(), softwareVersion: useRuntimeConfig().version })
})
