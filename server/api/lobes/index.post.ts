import { rename, rm } from 'node:fs/promises'
import { join } from 'node:path'
import formidable, { errors as formidableErrors } from 'formidable'
import { eq } from 'drizzle-orm'
import { lobeUploadFieldsSchema } from '#shared/types/lobes'
import { ALGORITHM_VERSION } from '#shared/utils/version'
import { zodIssues } from '../../utils/validate'

interface AnalyseResult {
  format: 'obj' | 'ply'
  sourceFaceCount: number
  triangulatedPolygons: number
  properties: Record<string, unknown> & { equivalentRadius: number }
  report: Record<string, unknown> & { warnings: { code: string, message: string }[], vertexCount: number, faceCount: number }
}

/**
 * Upload one lobe mesh (multipart: `file`, `units` m|km, `density` kg m⁻³, `name`, optional
 * `referenceRadius` m and `spinPeriodHours`). The role is checked before the body is read; the file
 * is stored by sha256 (formidable writes inside UPLOADS_DIR, then one rename), analysed on a worker
 * thread, and the lobe's properties answered with 201. Bad meshes answer 422 with what and where.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const config = useConfig()
  const declared = Number(getRequestHeader(event, 'content-length'))
  if (Number.isFinite(declared) && declared > config.maxUploadBytes + 64 * 1024) throw tooLarge(config.maxUploadBytes)
  const paths = uploadPaths()
  const started: string[] = []
  const form = formidable({
    uploadDir: paths.tmp,
    maxFiles: 1,
    maxFields: 10,
    maxFieldsSize: 64 * 1024,
    maxFileSize: config.maxUploadBytes,
    maxTotalFileSize: config.maxUploadBytes,
    allowEmptyFiles: true,
    minFileSize: 0,
    hashAlgorithm: 'sha256',
    filter: part => part.name === 'file',
  })
  form.on('fileBegin', (_name, file) => started.push(file.filepath))
  let tmpPath: string | undefined
  try {
    let fields: formidable.Fields
    let files: formidable.Files
    try {
      [fields, files] = await form.parse(event.node.req)
    }
    catch (error) {
      const code = (error as { code?: number }).code
      if (code === formidableErrors.biggerThanMaxFileSize || code === formidableErrors.biggerThanTotalMaxFileSize) throw tooLarge(config.maxUploadBytes)
      throw createError({ status: 400, statusText: 'Bad Request', message: `The upload could not be read: ${(error as Error).message}` })
    }
    const file = files.file?.[0]
    if (!file) throw unprocessable('Attach the mesh as the multipart field "file"', [{ path: 'file', message: 'missing' }])
    tmpPath = file.filepath
    const one = (k: string) => fields[k]?.[0]
    const parsed = lobeUploadFieldsSchema.safeParse({
      units: one('units') || undefined, density: one('density'), name: one('name') || undefined,
      referenceRadius: one('referenceRadius') || undefined, spinPeriodHours: one('spinPeriodHours') || undefined,
    })
    if (!parsed.success) {
      const issues = zodIssues(parsed.error)
      throw unprocessable(`Invalid upload fields: ${issues.map(i => `${i.path}: ${i.message}`).join('; ')}`, issues)
    }
    const input = parsed.data
    if (file.size === 0) throw unprocessable('The file is empty', [{ path: 'file', message: 'empty file' }], 'empty-file')
    const sha256 = String(file.hash)
    const derived = derivedMeshPaths(sha256, input.units)
    let analysed: AnalyseResult
    try {
      analysed = await useWorkerPool().run<AnalyseResult>('analyse', {
        filePath: file.filepath, units: input.units, density: input.density, referenceRadius: input.referenceRadius,
        analysisMeshPath: derived.analysis, displayMeshPath: derived.display, displayFaceBudget: DISPLAY_FACE_BUDGET, maxFaces: 20_000_000,
      }, { priority: 10 })
    }
    catch (error) {
      throw toHttpError(error)
    }
    const ext = analysed.format
    const storedPath = join('meshes', `${sha256}.${ext}`)
    const db = useDB()
    const existing = await db.select().from(schema.meshFiles).where(eq(schema.meshFiles.sha256, sha256)).get()
    if (existing) await rm(file.filepath, { force: true })
    else {
      await rename(file.filepath, join(paths.root, storedPath))
      await db.insert(schema.meshFiles).values({ sha256, format: ext, byteSize: file.size, storedPath }).onConflictDoNothing()
    }
    tmpPath = undefined
    const name = input.name || (file.originalFilename ?? 'lobe').replace(/\.(obj|ply)$/i, '').slice(0, 120) || 'lobe'
    const [lobe] = await db.insert(schema.lobes).values({
      name,
      ownerId: actor.id,
      sha256,
      sourceFileName: (file.originalFilename ?? `${sha256}.${ext}`).slice(0, 255),
      format: ext,
      units: input.units,
      density: input.density,
      referenceRadius: input.referenceRadius ?? null,
      spinPeriodHours: input.spinPeriodHours ?? null,
      vertexCount: analysed.report.vertexCount,
      faceCount: analysed.report.faceCount,
      warnings: analysed.report.warnings,
      report: { ...analysed.report, sourceFaceCount: analysed.sourceFaceCount, triangulatedPolygons: analysed.triangulatedPolygons },
      properties: analysed.properties,
      algorithmVersion: ALGORITHM_VERSION,
    }).returning()
    const job = await startSurfaceJob(db, lobe!)
    await audit(event, { actorId: actor.id, action: 'lobe.uploaded', subjectType: 'lobe', subjectId: lobe!.id, detail: { sha256, faces: lobe!.faceCount, density: input.density, units: input.units } })
    setResponseStatus(event, 201)
    return lobeView(lobe!, job, { id: actor.id, name: actor.name })
  }
  finally {
    // Nothing half-written stays behind: a failed or repeated upload leaves no temporary file.
    for (const p of started) if (p !== undefined) await rm(p, { force: true }).catch(() => undefined)
    if (tmpPath) await rm(tmpPath, { force: true }).catch(() => undefined)
  }
})

function tooLarge(limit: number) {
  return createError({ status: 413, statusText: 'Content Too Large', message: `The upload is larger than the limit of ${Math.round(limit / 1024 / 1024)} MB (ISTHMUS_MAX_UPLOAD_MB)` })
}
