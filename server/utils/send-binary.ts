import type { H3Event } from 'h3'

/**
 * Streams a derived binary file from the mesh store with an ETag (content-addressed, so it never
 * changes under the same tag): a matching If-None-Match answers 304 with no body.
 */
export async function sendBinaryFile(event: H3Event, key: string, etag: string) {
  setResponseHeaders(event, { 'etag': etag, 'cache-control': 'private, max-age=0, must-revalidate', 'content-type': 'application/octet-stream' })
  if (getRequestHeader(event, 'if-none-match') === etag) {
    setResponseStatus(event, 304)
    return null
  }
  const store = await useMeshStore()
  setResponseHeader(event, 'content-length', await store.size(key))
  return sendStream(event, await store.stream(key))
}
