import { rm } from 'node:fs/promises'
import { asc, eq } from 'drizzle-orm'
import { ALGORITHM_VERSION } from '#shared/utils/version'
import type { LobeOrigin, LobeReport } from '#shared/types/lobes'
import { sameFileWarning, sizeCheckWarning } from '#shared/utils/lobe-checks'
import type { AnalyseResult } from '../workers/mesh-tasks'
import { normaliseFileName } from '#shared/utils/names'

export interface IngestInput {
  /** A file inside UPLOADS_DIR/tmp (renames across file systems fail). Moved or removed here. */
  filePath: string
  size: number
  sha256: string
  originalName?: string | null
  ownerId: number
  name?: string
  units: 'm' | 'km'
  density: number
  referenceRadius?: number
  spinPeriodHours?: number
  /** Unit spin axis, file frame (default: the axis of the largest moment). */
  spinAxis?: [number, number, number]
  /** Warnings the caller adds to the mesh report's own (e.g. what a derived lobe leaves out). */
  extraWarnings?: { code: string, message: string }[]
  /** Where a derived lobe came from (e.g. `{ kind: 'cut', lobeId, ... }`), kept as `report.origin`. */
  origin?: LobeOrigin
}

/**
 * Analyses a mesh file on a worker thread, stores it by content hash (one rename; a repeated upload
 * keeps the stored copy), records the lobe and queues its surface-field job. Adds to the mesh's
 * own warnings a 'size-check' when the body's size is implausible for the units, and a 'same-file'
 * naming the lobes made earlier from the same file (`report.sameFile` lists them).
 * @throws 422 (GeometryError mapped by toHttpError) when the mesh cannot be used.
 */
export async function ingestLobe(input: IngestInput) {
  const derived = derivedMeshKeys(input.sha256, input.units)
  const store = await useMeshStore()
  let analysed: AnalyseResult
  const tw = performance.now()
  const dispatchedAt = Date.now()
  let sourceKey: string | undefined
  try {
    sourceKey = await stageLocalFile(input.filePath)
    analysed = await runWorkerTask('analyse', {
      sourceKey, units: input.units, density: input.density, referenceRadius: input.referenceRadius,
      analysisKey: derived.analysis, maxFaces: 20_000_000,
    }, { interactive: true, priority: 10 })
  }
  catch (error) {
    await rm(input.filePath, { force: true })
    if (sourceKey) await store.remove(sourceKey)
    throw toHttpError(error)
  }
  const ext = analysed.format
  const storedPath = `meshes/${input.sha256}.${ext}`
  const db = useDB()
  const workerMs = performance.now() - tw
  const td = performance.now()
  const existing = await db.select().from(schema.meshFiles).where(eq(schema.meshFiles.sha256, input.sha256)).get()
  if (existing) await store.remove(sourceKey)
  else {
    await store.move(sourceKey, storedPath)
    await db.insert(schema.meshFiles).values({ sha256: input.sha256, format: ext, byteSize: input.size, storedPath }).onConflictDoNothing()
  }
  const earlier = await db.select({ id: schema.lobes.id, name: schema.lobes.name, units: schema.lobes.units }).from(schema.lobes)
    .where(eq(schema.lobes.sha256, input.sha256)).orderBy(asc(schema.lobes.id))
  const checks = [
    sizeCheckWarning(Number(analysed.properties.equivalentRadius), input.units),
    sameFileWarning(earlier, input.units),
  ].filter(w => w !== null)
  const originalName = input.originalName ? normaliseFileName(input.originalName) : ''
  const fallbackName = [...originalName.replace(/\.(obj|ply)$/i, '')].slice(0, 120).join('').trim() || 'lobe'
  const [lobe] = await db.insert(schema.lobes).values({
    name: input.name || fallbackName,
    ownerId: input.ownerId,
    sha256: input.sha256,
    sourceFileName: originalName || `${input.sha256}.${ext}`,
    format: ext,
    units: input.units,
    density: input.density,
    referenceRadius: input.referenceRadius ?? null,
    spinPeriodHours: input.spinPeriodHours ?? null,
    spinAxis: input.spinAxis ?? null,
    vertexCount: analysed.report.vertexCount,
    faceCount: analysed.report.faceCount,
    warnings: [...analysed.report.warnings, ...checks, ...(input.extraWarnings ?? [])],
    // The worker's report is the core's ValidationReport without the per-face origin map.
    report: {
      ...analysed.report as unknown as LobeReport, sourceFaceCount: analysed.sourceFaceCount, triangulatedPolygons: analysed.triangulatedPolygons, timingsMs: analysed.timings,
      ...(earlier.length ? { sameFile: earlier } : {}),
      ...(input.origin ? { origin: input.origin } : {}),
    },
    properties: analysed.properties,
    algorithmVersion: ALGORITHM_VERSION,
  }).returning()
  // The display copy is prepared in the background: the answer does not wait for it.
  void ensureDisplayMesh(input.sha256, input.units).catch(error => console.error('[isthmus] display mesh failed:', error))
  const job = await startSurfaceJob(db, lobe!, input.ownerId)
  return { lobe: lobe!, job, timings: { worker: workerMs, queued: analysed.receivedAt - dispatchedAt, store: performance.now() - td, ...analysed.timings } }
}
