import type { H3Event } from 'h3'
import type { z } from 'zod'

/** Issues in the shape every 422 answer carries: `data.issues: [{ path, message }]`. */
export function zodIssues(error: z.ZodError): { path: string, message: string }[] {
  return error.issues.map(i => ({ path: i.path.map(String).join('.') || '(body)', message: i.message }))
}

export function unprocessable(message: string, issues: { path: string, message: string }[], code = 'invalid-input') {
  return createError({ status: 422, statusText: 'Unprocessable Content', message, data: { code, issues } })
}

function parseWith<T extends z.ZodType>(schema: T, value: unknown, what: string): z.infer<T> {
  const result = schema.safeParse(value)
  if (!result.success) {
    const issues = zodIssues(result.error)
    throw unprocessable(`Invalid ${what}: ${issues.map(i => `${i.path}: ${i.message}`).join('; ')}`, issues)
  }
  return result.data
}

/** `application/json` or a `+json` type, with any parameters (`; charset=utf-8`). */
function isJsonType(type: string | undefined): boolean {
  const essence = (type ?? '').split(';')[0]!.trim().toLowerCase()
  return essence === 'application/json' || /^application\/[\w.+-]+\+json$/.test(essence)
}

/** Whether the request carries a body (declared length above 0, or chunked). */
function hasBody(event: H3Event): boolean {
  const length = getRequestHeader(event, 'content-length')
  if (length !== undefined) return Number(length) > 0
  return getRequestHeader(event, 'transfer-encoding') !== undefined
}

/**
 * Reads and validates a JSON body; bad or missing JSON and schema failures answer 422. JSON routes
 * take JSON only: a body of any other type (a form post, text) answers 415 before it is read.
 */
export async function readBodyAs<T extends z.ZodType>(event: H3Event, schema: T): Promise<z.infer<T>> {
  if (hasBody(event) && !isJsonType(getRequestHeader(event, 'content-type'))) {
    throw createError({
      status: 415,
      statusText: 'Unsupported Media Type',
      message: 'Send the body as JSON (Content-Type: application/json)',
      data: { code: 'unsupported-media-type', issues: [{ path: '(body)', message: 'not application/json' }] },
    })
  }
  let body: unknown
  try {
    body = await readBody(event)
  }
  catch {
    throw unprocessable('The request body is not valid JSON', [{ path: '(body)', message: 'not valid JSON' }])
  }
  return parseWith(schema, body ?? {}, 'request body')
}

export function queryAs<T extends z.ZodType>(event: H3Event, schema: T): z.infer<T> {
  return parseWith(schema, getQuery(event), 'query')
}

export function paramsAs<T extends z.ZodType>(event: H3Event, schema: T): z.infer<T> {
  return parseWith(schema, getRouterParams(event, { decode: true }), 'route parameter')
}

export function notFound(what: string) {
  return createError({ status: 404, statusText: 'Not Found', message: `${what} not found` })
}
