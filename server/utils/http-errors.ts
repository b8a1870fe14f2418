import { GeometryError } from '../../shared/geometry/types'

/** Maps a core GeometryError to 422 with `data: { code, issues }`; other errors pass through. */
export function toHttpError(error: unknown) {
  if (error instanceof GeometryError) {
    // The core prefixes messages with its function name (for developers); people get the rest.
    const text = error.message.replace(/^[a-zA-Z]+: /, '')
    const counted = /faces\[|vertices\[|\bface \d|\bvertex \d/.test(text) || error.issues.some(i => /\[\d+\]/.test(i.path))
    return createError({
      status: 422,
      statusText: 'Unprocessable Content',
      message: counted ? `${text} (faces and vertices are numbered from 0, in file order)` : text,
      data: { code: error.code, issues: error.issues.length ? error.issues : [{ path: 'file', message: error.message }] },
    })
  }
  return error
}
