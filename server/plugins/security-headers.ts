import { randomBytes } from 'node:crypto'

/**
 * Security headers. Every response: `X-Content-Type-Options: nosniff`, `X-Frame-Options: DENY`,
 * `Referrer-Policy: same-origin`. Every rendered page (HTML) also: a Content-Security-Policy whose
 * scripts must come from this origin or carry the page's one-time nonce (Nuxt's inline start-up
 * script gets it here), no framing by other sites, no plugins, and connections, fonts, images and
 * workers from this origin only (plus `blob:`/`data:` images and `blob:` workers, which the 3-D
 * viewer and chart downloads may use). Styles allow inline ones: server-rendered `style`
 * attributes would otherwise be dropped. `nuxt dev` gets no CSP (its module reloading evaluates code).
 */
const STATIC_HEADERS = {
  'x-content-type-options': 'nosniff',
  'x-frame-options': 'DENY',
  'referrer-policy': 'same-origin',
  'cross-origin-opener-policy': 'same-origin',
} as const

export function contentSecurityPolicy(nonce: string): string {
  return [
    `default-src 'self'`,
    `script-src 'self' 'nonce-${nonce}'`,
    `style-src 'self' 'unsafe-inline'`,
    `img-src 'self' data: blob:`,
    `font-src 'self' data:`,
    `connect-src 'self'`,
    `worker-src 'self' blob:`,
    `object-src 'none'`,
    `base-uri 'self'`,
    `form-action 'self'`,
    `frame-ancestors 'none'`,
  ].join('; ')
}

const NONCES = new WeakMap<object, string>()
const ZOD_JITLESS = '<script>globalThis.__zod_globalConfig=Object.assign(globalThis.__zod_globalConfig||{},{jitless:true})</script>'

export default defineNitroPlugin((nitro) => {
  nitro.hooks.hook('request', (event) => {
    setResponseHeaders(event, STATIC_HEADERS)
  })
  if (import.meta.dev) return
  nitro.hooks.hook('render:html', (html, { event }) => {
    const nonce = randomBytes(16).toString('base64')
    NONCES.set(event, nonce)
    const sign = (chunks: string[]) => chunks.map(c => c.replace(/<script(?=[\s>])/g, `<script nonce="${nonce}"`))
    // zod probes once whether it may compile parsers with `new Function`, when its first object
    // schema is built (as the page's modules load); under this CSP the probe, although caught, is
    // reported as a violation. Its global config is read from `globalThis.__zod_globalConfig`:
    // setting `jitless` there before any module runs skips the probe (plain parsers, same results).
    html.head = sign([ZOD_JITLESS, ...html.head])
    html.bodyPrepend = sign(html.bodyPrepend)
    html.body = sign(html.body)
    html.bodyAppend = sign(html.bodyAppend)
  })
  nitro.hooks.hook('render:response', (response, { event }) => {
    const nonce = NONCES.get(event)
    if (!nonce) return
    response.headers = { ...response.headers, 'content-security-policy': contentSecurityPolicy(nonce) }
  })
})
