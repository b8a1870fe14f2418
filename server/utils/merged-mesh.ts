import type { H3Event } from 'h3'
import { writeObj, writePly } from '#shared/geometry'
import { decodeAnalysisMesh } from '#shared/utils/mesh-binary'
import { idParamSchema } from '#shared/types/account'

/** The merged body's full mesh (metres, contact frame) as OBJ or binary PLY (double). */
export async function sendMergedMesh(event: H3Event, format: 'obj' | 'ply') {
  await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const { study } = await loadStudy(useDB(), id)
  const key = studyMeshKeys(study.cacheKey).analysis
  const store = await useMeshStore()
  if (study.status !== 'done' || !(await store.exists(key))) throw notFound('Merged-body mesh')
  const mesh = decodeAnalysisMesh(await store.read(key))
  const bytes = format === 'obj' ? writeObj(mesh, { comment: `Isthmus study ${id} merged body, metres, contact frame` }) : writePly(mesh, 'binary_little_endian', { double: true })
  setResponseHeaders(event, { 'content-type': format === 'obj' ? 'text/plain; charset=utf-8' : 'application/octet-stream', 'content-disposition': `attachment; filename="study-${id}-merged.${format}"` })
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength)
}
