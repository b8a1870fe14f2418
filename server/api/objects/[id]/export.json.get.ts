/**
 * The whole record as JSON: current values, every attachment (values at full float64 precision,
 * units, spread, reference radius, provenance), comment threads, history and cautions.
 */
export default defineEventHandler(async (event) => {
  const data = await recordForExport(event, 'json')
  setResponseHeader(event, 'Content-Disposition', `attachment; filename="${recordFileName(data.object.designation)}.json"`)
  return {
    format: 'isthmus-object-record',
    formatVersion: 1,
    exportedAt: new Date().toISOString(),
    softwareVersion: useRuntimeConfig().version,
    link: publicLink(`/objects/${data.object.id}`),
    units: 'SI unless the unit says otherwise; referenceRadius in m; orbit semi-major axis in au, inclination in degrees.',
    ...data,
  }
})
