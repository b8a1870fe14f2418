import { Readable } from 'node:stream'
import { FACE_FIELD_KEYS } from '#shared/geometry'
import { decodeAnalysisMesh } from '#shared/utils/mesh-binary'
import { faceFieldsPly } from '#shared/utils/face-fields-file'

/**
 * The analysis mesh as binary little-endian PLY (metres, file frame) with every surface field as a
 * per-face double property, streamed; the comments state units and conventions. 409 while the
 * fields are being computed.
 */
export default defineEventHandler(async (event) => {
  const { lobe, file } = await lobeFieldsForExport(event, 'ply')
  const mesh = decodeAnalysisMesh(await (await useMeshStore()).read(derivedMeshKeys(lobe.sha256, lobe.units).analysis))
  const fields = [...FACE_FIELD_KEYS, 'geopotentialHeight']
  const comments = [...fieldExportComments(lobe, file), `units: ${fields.map(f => `${f} ${file.header.units[f]}`).join(', ')}`]
  setResponseHeaders(event, { 'content-type': 'application/octet-stream', 'content-disposition': `attachment; filename="lobe-${lobe.id}-fields.ply"` })
  return sendStream(event, Readable.from(faceFieldsPly(mesh.positions, mesh.indices, file, fields, comments)))
})
