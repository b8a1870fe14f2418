/** A tiny HTTP client with a cookie jar, like a script or a browser tab without JavaScript. */
export class Agent {
  private cookies = new Map<string, string>()
  constructor(readonly base: string, readonly headers: Record<string, string> = {}) {}

  async request(method: string, path: string, body?: unknown, headers: Record<string, string> = {}) {
    const h: Record<string, string> = { ...this.headers, ...headers }
    if (this.cookies.size) h.cookie = [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
    let payload: BodyInit | undefined
    if (body instanceof FormData || body instanceof Uint8Array || typeof body === 'string') payload = body as BodyInit
    else if (body !== undefined) {
      payload = JSON.stringify(body)
      h['content-type'] = 'application/json'
    }
    const res = await fetch(this.base + path, { method, headers: h, body: payload, redirect: 'manual' })
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(';')
      const i = pair!.indexOf('=')
      const name = pair!.slice(0, i)
      const value = pair!.slice(i + 1)
      if (!value || /max-age=0|expires=thu, 01 jan 1970/i.test(c)) this.cookies.delete(name)
      else this.cookies.set(name, value)
    }
    const text = await res.text()
    let json: any
    try {
      json = text ? JSON.parse(text) : undefined
    }
    catch {
      json = undefined
    }
    return { status: res.status, headers: res.headers, text, json }
  }

  /** The session cookies as a `cookie` header value (for requests made without this client). */
  cookieHeader(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  }

  get(path: string, headers?: Record<string, string>) { return this.request('GET', path, undefined, headers) }
  post(path: string, body?: unknown, headers?: Record<string, string>) { return this.request('POST', path, body, headers) }
  patch(path: string, body?: unknown) { return this.request('PATCH', path, body) }
  delete(path: string) { return this.request('DELETE', path) }

  async signIn(email: string, password: string) {
    const res = await this.post('/api/session', { email, password })
    if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${res.text}`)
    return res.json.user
  }
}

interface DroppedMail { envelopeTo: string[], subject: string, text: string }

/**
 * The newest mail to `to` in the server's mail drop (that `match` accepts, when given), read
 * through the admin API; waits for it, since some mails are sent after the answer.
 */
export async function latestMailTo(admin: Agent, to: string, timeoutMs = 5000, match: (m: DroppedMail) => boolean = () => true): Promise<{ subject: string, text: string }> {
  const deadline = Date.now() + timeoutMs
  while (Date.now() < deadline) {
    const res = await admin.get('/api/mail-drop?limit=50')
    const hit = res.json?.items?.find((m: DroppedMail) => m.envelopeTo.includes(to) && match(m))
    if (hit) return hit
    await new Promise(r => setTimeout(r, 100))
  }
  throw new Error(`no mail to ${to} arrived`)
}

export function linkIn(text: string): string {
  const m = text.match(/https?:\/\/\S+/)
  if (!m) throw new Error(`no link in mail:\n${text}`)
  return m[0]
}
