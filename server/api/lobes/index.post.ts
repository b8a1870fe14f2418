import { rm } from 'node:fs/promises'
import { labelIssue, lobeUploadFieldsSchema } from '#shared/types/lobes'
import { zodIssues } from '../../utils/validate'

/**
 * Upload one lobe mesh (multipart: `file`, `units` m|km, `density` kg m⁻³, `name`, optional
 * `referenceRadius` m and `spinPeriodHours`). The role is checked before the body is read; the file
 * is stored by sha256 (formidable writes inside UPLOADS_DIR, then one rename), analysed on a worker
 * thread, and the lobe's properties answered with 201. Bad meshes answer 422 with what and where.
 * The mesh part is read with or without a Content-Type (`readMeshUpload`).
 * The answer's `warnings` include 'size-check' (a size no target body has: wrong units?) and
 * 'same-file' (the same file as earlier lobes, named) besides the mesh's own.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const config = useConfig()
  const declared = Number(getRequestHeader(event, 'content-length'))
  if (Number.isFinite(declared) && declared > config.maxUploadBytes + 64 * 1024) throw uploadTooLarge(config.maxUploadBytes)
  const paths = uploadPaths()
  const started: string[] = []
  const timing: string[] = []
  let tmpPath: string | undefined
  try {
    const t0 = performance.now()
    const { fields, file } = await readMeshUpload(event.node.req, { uploadDir: paths.tmp, maxFileBytes: config.maxUploadBytes, onFileStart: p => started.push(p) })
    timing.push(`receive;dur=${(performance.now() - t0).toFixed(1)}`)
    if (!file) throw unprocessable('Attach the mesh as the multipart field "file"', [{ path: 'file', message: 'missing' }])
    tmpPath = file.filepath
    const one = (k: string) => fields[k]?.[0]
    const parsed = lobeUploadFieldsSchema.safeParse({
      units: one('units') || undefined, density: one('density') || undefined, name: one('name') || undefined,
      referenceRadius: one('referenceRadius') || undefined, spinPeriodHours: one('spinPeriodHours') || undefined,
    })
    if (!parsed.success) {
      const issues = zodIssues(parsed.error)
      // The message names fields as the form does ("Bulk density: …"); issues[].path keeps the field names.
      throw unprocessable(`Invalid upload fields: ${issues.map(labelIssue).join('; ')}`, issues)
    }
    const input = parsed.data
    if (file.size === 0) throw unprocessable('The file is empty', [{ path: 'file', message: 'empty file' }], 'empty-file')
    const t1 = performance.now()
    const { lobe, job, timings } = await ingestLobe({
      filePath: file.filepath, size: file.size, sha256: String(file.hash), originalName: file.originalFilename, ownerId: actor.id, ...input,
    })
    tmpPath = undefined
    await audit(event, { actorId: actor.id, action: 'lobe.uploaded', subjectType: 'lobe', subjectId: lobe.id, detail: { sha256: lobe.sha256, faces: lobe.faceCount, density: input.density, units: input.units } })
    timing.push(`analyse;dur=${(performance.now() - t1).toFixed(1)}`, ...Object.entries(timings).map(([k, v]) => `${k};dur=${v.toFixed(1)}`))
    setResponseHeader(event, 'server-timing', timing.join(', '))
    setResponseStatus(event, 201)
    return lobeView(lobe, job, { id: actor.id, name: actor.name })
  }
  finally {
    // Nothing half-written stays behind: a failed or repeated upload leaves no temporary file.
    for (const p of started) if (p !== undefined) await rm(p, { force: true }).catch(() => undefined)
    if (tmpPath) await rm(tmpPath, { force: true }).catch(() => undefined)
  }
})
