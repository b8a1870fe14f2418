import { recordCitation } from '#shared/utils/records-export'

/** Plain-text citation block: how to cite the record, the accepted values with provenance, the cautions. */
export default defineEventHandler(async (event) => {
  const data = await recordForExport(event, 'txt')
  setResponseHeader(event, 'Content-Type', 'text/plain; charset=utf-8')
  return recordCitation(data, { link: publicLink(`/objects/${data.object.id}`), exportedAt: new Date(), softwareVersion: useRuntimeConfig().version })
})
