/**
 * BibTeX of the accepted values (one @misc entry each, written by citation-js): title with the
 * record, subject, quantity, value and unit; the provenance (mesh sha256, densities, approach,
 * software and algorithm versions, accepted date, precision) in `note`.
 */
export default defineEventHandler(async (event) => {
  const data = await recordForExport(event, 'bibtex')
  setResponseHeader(event, 'Content-Type', 'application/x-bibtex; charset=utf-8')
  setResponseHeader(event, 'Content-Disposition', `attachment; filename="${recordFileName(data.object.designation)}.bib"`)
  return recordBibtex(data, { link: publicLink(`/objects/${data.object.id}`), exportedAt: new Date(), softwareVersion: useRuntimeConfig().version })
})
