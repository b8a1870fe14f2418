import { randomUUID } from 'node:crypto'
import { createError, isError } from 'h3'
import { GeometryError } from '#shared/geometry'

/**
 * GeometryError codes that mean the core itself failed (a spatial index that lost faces, a boolean
 * operation the kernel could not finish), not that the input was bad: these answer 500.
 */
export const INTERNAL_GEOMETRY_CODES: ReadonlySet<string> = new Set(['BVH_FAILED', 'BOOLEAN_FAILED'])

/**
 * An internal fault as a 500 whose answer carries a reference id; the full error is logged with the
 * same id, so a member can quote it and the log shows what happened. Nothing internal is answered.
 */
export function internalFault(error: unknown, context = 'request') {
  const reference = randomUUID()
  console.error(`[isthmus] internal fault ${reference} (${context}):`, error)
  return createError({
    status: 500,
    statusText: 'Internal Server Error',
    message: `Something went wrong on the server (reference ${reference}). It has been logged; quote the reference when reporting it.`,
    data: { code: 'internal', reference },
  })
}

/**
 * Maps a failure of geometry work to an HTTP error. A GeometryError about the input answers 422 with
 * `data: { code, issues }`; a core failure (`INTERNAL_GEOMETRY_CODES`) or any other error answers 500
 * with a logged reference id (`internalFault`). HTTP errors already made pass through.
 * The core prefixes its messages with the function name (for developers); people get the rest.
 * The core's messages say themselves how they number faces and vertices, so nothing is appended.
 */
export function toHttpError(error: unknown, context = 'geometry') {
  if (error instanceof GeometryError && !INTERNAL_GEOMETRY_CODES.has(error.code)) {
    const text = error.message.replace(/^[a-zA-Z]+: /, '')
    return createError({
      status: 422,
      statusText: 'Unprocessable Content',
      message: text,
      // Issues add places (faces, lines) to the message; a message without places has none.
      data: { code: error.code, issues: error.issues },
    })
  }
  if (isError(error)) return error
  return internalFault(error, context)
}
