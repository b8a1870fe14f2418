import { getRequestURL } from 'h3'

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])

/**
 * Rejects cross-site state-changing requests. Browsers send `Origin` (and `Sec-Fetch-Site`) on
 * every POST/PATCH/PUT/DELETE; scripts with an API token usually send neither and pass.
 */
export default defineEventHandler((event) => {
  if (SAFE.has(event.method) || !event.path.startsWith('/api/')) return
  const site = getRequestHeader(event, 'sec-fetch-site')
  const origin = getRequestHeader(event, 'origin')
  if (!origin) {
    if (site === 'cross-site') throw forbiddenOrigin()
    return
  }
  const allowed = new Set([new URL(useConfig().publicUrl).origin, getRequestURL(event).origin])
  if (origin === 'null' || !allowed.has(origin)) throw forbiddenOrigin()
})

function forbiddenOrigin() {
  return createError({ status: 403, statusText: 'Forbidden', message: 'Cross-site request refused (Origin does not match this server)' })
}
