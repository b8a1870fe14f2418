import { createHash } from 'node:crypto'
import { writeFile } from 'node:fs/promises'
import { join } from 'node:path'
import { writePly } from '#shared/geometry'
import { decodeAnalysisMesh } from '#shared/utils/mesh-binary'
import type { LobeOrigin } from '#shared/types/lobes'

/**
 * Turns a derived analysis mesh (metres, mesh-store key) into a stored lobe of its own (binary PLY file).
 * `origin` (where the mesh came from) is kept in the lobe's report.
 */
export async function lobeFromAnalysisMesh(analysisKey: string, opts: { ownerId: number, name: string, fileName: string, density: number, spinPeriodHours?: number, spinAxis?: [number, number, number], extraWarnings?: { code: string, message: string }[], origin?: LobeOrigin }) {
  const mesh = decodeAnalysisMesh(await (await useMeshStore()).read(analysisKey))
  const bytes = writePly(mesh, 'binary_little_endian', { double: true })
  const sha256 = createHash('sha256').update(bytes).digest('hex')
  const filePath = join(uploadPaths().tmp, `derived-${sha256}-${process.hrtime.bigint()}`)
  await writeFile(filePath, bytes)
  return ingestLobe({ filePath, size: bytes.length, sha256, originalName: opts.fileName, ownerId: opts.ownerId, name: opts.name, units: 'm', density: opts.density, spinPeriodHours: opts.spinPeriodHours, spinAxis: opts.spinAxis, extraWarnings: opts.extraWarnings, origin: opts.origin })
}
