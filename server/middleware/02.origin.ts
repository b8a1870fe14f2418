const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])
const LOOPBACK = ['localhost', '127.0.0.1', '[::1]']

let allowed: Set<string> | undefined

/**
 * Origins the app is served from: the configured public URL only (never one built from the
 * request's Host header, which a rebinding DNS name controls). When that URL is on loopback, its
 * loopback aliases on the same scheme and port count too, so the app opened at localhost:PORT or
 * 127.0.0.1:PORT works either way; only this machine can reach those.
 */
function allowedOrigins(): Set<string> {
  if (allowed) return allowed
  const url = new URL(useConfig().publicUrl)
  allowed = new Set([url.origin])
  if (LOOPBACK.includes(url.hostname)) {
    for (const host of LOOPBACK) allowed.add(`${url.protocol}//${host}${url.port ? `:${url.port}` : ''}`)
  }
  return allowed
}

/**
 * Rejects cross-site state-changing requests on every path. Browsers send `Origin` (and
 * `Sec-Fetch-Site`) on every POST/PATCH/PUT/DELETE; scripts with an API token usually send
 * neither and pass. An `Origin` header that is present but empty (or `null`) is refused.
 */
export default defineEventHandler((event) => {
  if (SAFE.has(event.method)) return
  const site = getRequestHeader(event, 'sec-fetch-site')
  // Absent is not the same as empty: an `Origin:` header with no value is a bad origin, not none.
  const origin = event.node.req.headers.origin
  if (origin === undefined) {
    if (site === 'cross-site') throw forbiddenOrigin()
    return
  }
  if (origin === 'null' || !allowedOrigins().has(origin.trim())) throw forbiddenOrigin()
})

function forbiddenOrigin() {
  return createError({ status: 403, statusText: 'Forbidden', message: 'Cross-site request refused (Origin is not this server\'s public URL)' })
}
