import { GeometryError } from '../../shared/geometry/types'

/** Maps a core GeometryError to 422 with `data: { code, issues }`; other errors pass through. */
export function toHttpError(error: unknown) {
  if (error instanceof GeometryError) {
    return createError({
      status: 422,
      statusText: 'Unprocessable Content',
      message: error.message,
      data: { code: error.code, issues: error.issues.length ? error.issues : [{ path: 'file', message: error.message }] },
    })
  }
  return error
}
