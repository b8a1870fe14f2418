import { createReadStream, statSync } from 'node:fs'
import type { H3Event } from 'h3'

/**
 * Streams a derived binary file with an ETag (content-addressed, so it never changes under the
 * same tag): a matching If-None-Match answers 304 with no body.
 */
export function sendBinaryFile(event: H3Event, path: string, etag: string) {
  setResponseHeaders(event, { 'etag': etag, 'cache-control': 'private, max-age=0, must-revalidate', 'content-type': 'application/octet-stream' })
  if (getRequestHeader(event, 'if-none-match') === etag) {
    setResponseStatus(event, 304)
    return null
  }
  setResponseHeader(event, 'content-length', statSync(path).size)
  return sendStream(event, createReadStream(path))
}
