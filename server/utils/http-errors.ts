import { GeometryError } from '#shared/geometry'

/**
 * Maps a core GeometryError to 422 with `data: { code, issues }`; other errors pass through.
 * The core prefixes its messages with the function name (for developers); people get the rest.
 * The core's messages say themselves how they number faces and vertices, so nothing is appended.
 */
export function toHttpError(error: unknown) {
  if (error instanceof GeometryError) {
    const text = error.message.replace(/^[a-zA-Z]+: /, '')
    return createError({
      status: 422,
      statusText: 'Unprocessable Content',
      message: text,
      // Issues add places (faces, lines) to the message; a message without places has none.
      data: { code: error.code, issues: error.issues },
    })
  }
  return error
}
