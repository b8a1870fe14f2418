import type { IncomingMessage } from 'node:http'
import formidable, { errors as formidableErrors } from 'formidable'

/** The mesh part's field name in the multipart upload. */
export const MESH_FIELD = 'file'

export interface MeshUploadOptions {
  /** Folder the file part is written to (inside UPLOADS_DIR, so the later rename is one step). */
  uploadDir: string
  /** Largest accepted file, bytes. */
  maxFileBytes: number
  /** Called with each file's temporary path as soon as formidable opens it (for clean-up). */
  onFileStart?: (path: string) => void
}

export interface MeshUpload {
  fields: formidable.Fields
  file: formidable.File | undefined
}

/**
 * Reads a mesh upload (multipart/form-data): one file part named `file` plus at most 10 small text
 * fields (64 KiB in all). The file is hashed (sha256) while it is written.
 *
 * RFC 7578 makes a part's Content-Type optional (it defaults to text/plain), and some clients
 * (Python's requests among them) send the file without one; formidable would then read it as a
 * text field. The part named `file` is therefore always the mesh, with or without Content-Type or a
 * file name.
 * @throws 413 over the size limit; 400 when the body is not readable multipart.
 */
export async function readMeshUpload(req: IncomingMessage, opts: MeshUploadOptions): Promise<MeshUpload> {
  const form = formidable({
    uploadDir: opts.uploadDir,
    maxFiles: 1,
    maxFields: 10,
    maxFieldsSize: 64 * 1024,
    maxFileSize: opts.maxFileBytes,
    maxTotalFileSize: opts.maxFileBytes,
    allowEmptyFiles: true,
    minFileSize: 0,
    hashAlgorithm: 'sha256',
    filter: part => part.name === MESH_FIELD,
  })
  // formidable takes a part for a file only when it has a Content-Type.
  form.onPart = (part) => {
    if (part.name === MESH_FIELD && !part.mimetype) part.mimetype = 'application/octet-stream'
    if (part.name === MESH_FIELD && part.originalFilename === undefined) part.originalFilename = ''
    return form._handlePart(part)
  }
  if (opts.onFileStart) form.on('fileBegin', (_name, file) => opts.onFileStart!(file.filepath))
  try {
    const [fields, files] = await form.parse(req)
    return { fields, file: files[MESH_FIELD]?.[0] }
  }
  catch (error) {
    const code = (error as { code?: number }).code
    if (code === formidableErrors.biggerThanMaxFileSize || code === formidableErrors.biggerThanTotalMaxFileSize) throw uploadTooLarge(opts.maxFileBytes)
    throw createError({ status: 400, statusText: 'Bad Request', message: `The upload could not be read: ${(error as Error).message}` })
  }
}

export function uploadTooLarge(limit: number) {
  return createError({ status: 413, statusText: 'Content Too Large', message: `The upload is larger than the limit of ${Math.round(limit / 1024 / 1024)} MB (ISTHMUS_MAX_UPLOAD_MB)` })
}
