import { existsSync } from 'node:fs'
import { readFile } from 'node:fs/promises'
import type { H3Event } from 'h3'
import { writeObj, writePly } from '#shared/geometry'
import { decodeAnalysisMesh } from '#shared/utils/mesh-binary'
import { idParamSchema } from '#shared/types/account'

/** The merged body's full mesh (metres, contact frame) as OBJ or binary PLY (double). */
export async function sendMergedMesh(event: H3Event, format: 'obj' | 'ply') {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const { study } = await loadStudy(useDB(), id)
  const path = studyMeshPaths(study.cacheKey).analysis
  if (study.status !== 'done' || !existsSync(path)) throw notFound('Merged-body mesh')
  const mesh = decodeAnalysisMesh(new Uint8Array(await readFile(path)))
  const bytes = format === 'obj' ? writeObj(mesh, { comment: `Isthmus study ${id} merged body, metres, contact frame` }) : writePly(mesh, 'binary_little_endian', { double: true })
  setResponseHeaders(event, { 'content-type': format === 'obj' ? 'text/plain; charset=utf-8' : 'application/octet-stream', 'content-disposition': `attachment; filename="study-${id}-merged.${format}"` })
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength)
}
