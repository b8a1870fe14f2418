import { Readable } from 'node:stream'
import { idParamSchema } from '#shared/types/account'
import { lobeFieldsQuerySchema } from '#shared/types/gravity'
import { FIELD_JSON_COLUMNS, faceFieldsJson } from '#shared/utils/face-fields-file'

/**
 * Per-face surface fields. Default (`on=mesh`): one value per face of the analysis mesh, row i =
 * face i, at its centroid (`evaluation: "mesh"`), streamed; units and conventions in the answer.
 * `on=display`: the display copy (positions in metres, file frame) with each display face coloured
 * by the value of the nearest analysis face — for the 3D view. 409 while the job is still running.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const { on } = queryAs(event, lobeFieldsQuerySchema)
  const { lobe, file } = await readyLobeFields(id)
  const { columns: _c, ...meta } = file.header
  if (on === 'display') {
    const { display, map } = await displayFaceMap(lobe)
    const pick = (name: string) => Array.from(map, f => file.column(name)[f]!)
    const positions = Array.from(display.positions, (v, i) => v + display.origin[i % 3]!)
    return {
      lobeId: id, on: 'display', evaluation: 'mesh', faceCount: file.faceCount, displayFaces: map.length,
      note: 'each display face shows the value of the nearest analysis-mesh face (the field is computed at every analysis face)',
      units: meta.units, positions, indices: Array.from(display.indices),
      gravity: pick('gravity'), slopeDeg: pick('slopeDeg'), geopotentialHeight: pick('geopotentialHeight'),
    }
  }
  setResponseHeader(event, 'content-type', 'application/json; charset=utf-8')
  return sendStream(event, Readable.from(faceFieldsJson(file, { lobeId: id, ...meta, points: file.faceCount }, FIELD_JSON_COLUMNS)))
})
