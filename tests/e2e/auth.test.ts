import { request as httpRequest } from 'node:http'
import { createServer as createNetServer, type Socket } from 'node:net'
import { SMTPServer } from 'smtp-server'
import { createTransport } from 'nodemailer'
import { simpleParser } from 'mailparser'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Agent, latestMailTo, linkIn } from './support/http'
import { freePort, startServer, type RunningServer } from './support/server'

/** A request over node:http, which (unlike fetch) sends the Host header given. */
function rawRequest(port: number, method: string, path: string, headers: Record<string, string>, body: string): Promise<{ status: number }> {
  return new Promise((resolve, reject) => {
    const req = httpRequest({ host: '127.0.0.1', port, method, path, headers }, (res) => {
      res.resume()
      res.on('end', () => resolve({ status: res.statusCode ?? 0 }))
    })
    req.on('error', reject)
    req.end(body)
  })
}

describe('sign-in, sessions, invitations and password resets', () => {
  let server: RunningServer
  let admin: Agent
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_SIGNIN_MAX_FAILURES: '3', ISTHMUS_SIGNIN_MAX_FAILURES_PER_IP: '1000', ISTHMUS_SIGNIN_WINDOW_SECONDS: '60' })
    admin = new Agent(server.url)
    await admin.signIn('root@example.org', 'root-password-123')
  })
  afterAll(() => server?.dispose())

  it('answers health with version and database state', async () => {
    const res = await new Agent(server.url).get('/api/health')
    expect(res.status).toBe(200)
    expect(res.json).toMatchObject({ ok: true, db: 'ok' })
    expect(typeof res.json.version).toBe('string')
  })

  it('signs in, reports the member, signs out; the cookie holds only id and name', async () => {
    const a = new Agent(server.url)
    expect((await a.get('/api/session')).json).toEqual({ user: null })
    const res = await a.post('/api/session', { email: 'ROOT@example.org', password: 'root-password-123' })
    expect(res.status).toBe(200)
    expect(res.json.user).toMatchObject({ email: 'root@example.org', role: 'admin' })
    expect(res.json.user.passwordHash).toBeUndefined()
    const cookie = res.headers.getSetCookie().join(';')
    expect(cookie).not.toMatch(/root@example\.org|admin/)
    expect(cookie.length).toBeLessThan(4096)
    // nuxt-auth-utils exposes the sealed session's content: only id, name, sign-in time and session version.
    const raw = await a.get('/api/_auth/session')
    expect(Object.keys(raw.json.user).sort()).toEqual(['id', 'name', 'signedInAt', 'sv'])
    expect(Math.abs(raw.json.user.signedInAt - Date.now())).toBeLessThan(60_000)
    expect((await a.get('/api/session')).json.user.email).toBe('root@example.org')
    expect((await a.delete('/api/session')).status).toBe(200)
    expect((await a.get('/api/session')).json).toEqual({ user: null })
    expect((await a.get('/api/members')).status).toBe(401)
    // Signing out ends every session of the member on the server, this file's admin agent's too.
    expect((await admin.get('/api/members')).status).toBe(401)
    await admin.signIn('root@example.org', 'root-password-123')
  })

  it('gives the same generic 401 for an unknown e-mail and a wrong password', async () => {
    const a = new Agent(server.url, { 'x-test': 'generic' })
    const unknown = await a.post('/api/session', { email: 'nobody@example.org', password: 'whatever-123' })
    const wrong = await a.post('/api/session', { email: 'root@example.org', password: 'not-the-password' })
    expect(unknown.status).toBe(401)
    expect(wrong.status).toBe(401)
    expect(unknown.json.message).toBe(wrong.json.message)
    expect((await a.post('/api/session', { email: 'not-an-email' })).status).toBe(422)
  })

  it('rate-limits failed sign-ins per account with a retry time', async () => {
    // Limit is 3 failures per key in this server's configuration.
    const victim = 'limited@example.org'
    const inv = await admin.post('/api/invitations', { email: victim, role: 'viewer' })
    expect(inv.status).toBe(201)
    const link = linkIn((await latestMailTo(admin, victim)).text)
    const member = new Agent(server.url)
    expect((await member.post(new URL(link).pathname.replace('/join/', '/api/join/'), { name: 'Limited', password: 'limited-pass-1' })).status).toBe(200)
    const attacker = new Agent(server.url)
    for (let i = 0; i < 3; i++) expect((await attacker.post('/api/session', { email: victim, password: `bad-guess-${i}` })).status).toBe(401)
    const blocked = await attacker.post('/api/session', { email: victim, password: 'limited-pass-1' })
    expect(blocked.status).toBe(429)
    expect(Number(blocked.headers.get('retry-after'))).toBeGreaterThan(0)
    expect(blocked.json.data.retryAfterSeconds).toBeGreaterThan(0)
    // Failures are stored per key in the database.
    const rows = await server.sql().execute({ sql: 'select count(*) as n from signin_failures where key = ?', args: [`account:${victim}`] })
    expect(Number(rows.rows[0]!.n)).toBeGreaterThanOrEqual(3)
  })

  it('refuses cross-site state-changing requests (Origin check) but lets scripts without Origin through', async () => {
    const a = new Agent(server.url)
    const evil = await a.post('/api/session', { email: 'root@example.org', password: 'root-password-123' }, { origin: 'https://evil.example' })
    expect(evil.status).toBe(403)
    const crossSite = await a.post('/api/session', { email: 'root@example.org', password: 'root-password-123' }, { 'sec-fetch-site': 'cross-site' })
    expect(crossSite.status).toBe(403)
    const same = await a.post('/api/session', { email: 'root@example.org', password: 'root-password-123' }, { origin: server.url })
    expect(same.status).toBe(200)
    // Reads are not state-changing and pass with any Origin.
    expect((await a.get('/api/health', { origin: 'https://evil.example' })).status).toBe(200)

    // Every path is checked, not only /api/*.
    expect((await a.post('/lobes', 'x', { origin: 'https://evil.example' })).status).toBe(403)
    expect((await a.request('DELETE', '/objects/1', undefined, { origin: 'https://evil.example' })).status).toBe(403)
    // The public URL here is http://127.0.0.1:PORT: its loopback aliases on the same port pass
    // (422: past the Origin check, the empty body is refused), another port does not.
    for (const alias of [`http://localhost:${server.port}`, `http://[::1]:${server.port}`]) {
      expect((await a.post('/api/session', {}, { origin: alias })).status, alias).toBe(422)
    }
    expect((await a.post('/api/session', {}, { origin: `http://127.0.0.1:${server.port + 1}` })).status).toBe(403)
    // An Origin matching a forged Host header (DNS rebinding) is not this server's origin.
    const rebound = await rawRequest(server.port, 'POST', '/api/session', { 'host': `rebound.example:${server.port}`, 'origin': `http://rebound.example:${server.port}`, 'content-type': 'application/json' }, '{}')
    expect(rebound.status).toBe(403)
    const own = await rawRequest(server.port, 'POST', '/api/session', { 'host': `127.0.0.1:${server.port}`, 'origin': server.url, 'content-type': 'application/json' }, '{}')
    expect(own.status).toBe(422)
  })

  it('resets a password by mail over local SMTP; the link works once; an expired link is refused; only hashes are stored', async () => {
    const email = 'resetter@example.org'
    const invited = await admin.post('/api/invitations', { email, role: 'analyst' })
    const invitation = await latestMailTo(admin, email)
    // Subject prefix like every other mail; expiry written for people, in UTC, to the minute.
    expect(invitation.subject).toBe('[Isthmus] You are invited to an Isthmus team')
    const expires = new Date(invited.json.expiresAt)
    const month = expires.toLocaleString('en-GB', { month: 'long', timeZone: 'UTC' })
    const hhmm = expires.toISOString().slice(11, 16)
    expect(invitation.text).toContain(`The link expires on ${expires.getUTCDate()} ${month} ${expires.getUTCFullYear()}, ${hhmm} UTC.`)
    expect(invitation.text).not.toMatch(/\d{4}-\d\d-\d\dT/)
    const joinLink = linkIn(invitation.text)
    expect(joinLink.startsWith(server.env.ISTHMUS_PUBLIC_URL!)).toBe(true)
    const joinToken = joinLink.split('/join/')[1]!
    const member = new Agent(server.url)
    expect((await member.get(`/api/join/${joinToken}`)).json).toMatchObject({ email, role: 'analyst' })
    expect((await member.post(`/api/join/${joinToken}`, { name: 'Resetter', password: 'first-password-1' })).status).toBe(200)
    expect((await new Agent(server.url).post(`/api/join/${joinToken}`, { name: 'Again', password: 'second-try-pass' })).status).toBe(410)

    const anon = new Agent(server.url)
    const unknown = await anon.post('/api/password-resets', { email: 'ghost@example.org' })
    const known = await anon.post('/api/password-resets', { email })
    expect(unknown.status).toBe(202)
    expect(known.status).toBe(202)
    expect(unknown.json.message).toBe(known.json.message)
    // The mail is sent after the answer: wait for it.
    const mail = await latestMailTo(admin, email, 5000, m => /reset/i.test(m.subject))
    expect(mail.subject).toBe('[Isthmus] Reset your password')
    const token = linkIn(mail.text).split('/reset/')[1]!
    expect((await anon.get(`/api/password-resets/${token}`)).status).toBe(200)
    expect((await anon.post(`/api/password-resets/${token}`, { password: 'second-password-2' })).status).toBe(200)
    expect((await anon.post(`/api/password-resets/${token}`, { password: 'third-password-3' })).status).toBe(410)
    expect((await new Agent(server.url).post('/api/session', { email, password: 'first-password-1' })).status).toBe(401)
    await new Agent(server.url).signIn(email, 'second-password-2')

    // An expired link: ask for another, then move its expiry into the past in the database.
    await anon.post('/api/password-resets', { email })
    const second = await latestMailTo(admin, email, 5000, m => /reset/i.test(m.subject) && !m.text.includes(token))
    const token2 = linkIn(second.text).split('/reset/')[1]!
    expect(token2).not.toBe(token)
    await server.sql().execute('update password_resets set expires_at = 0 where used_at is null')
    expect((await anon.post(`/api/password-resets/${token2}`, { password: 'fourth-password-4' })).status).toBe(410)

    // Only hashes at rest: no token or password appears in any row.
    const db = server.sql()
    const resets = (await db.execute('select token_hash from password_resets')).rows
    const invites = (await db.execute('select token_hash from invitations')).rows
    const users = (await db.execute('select password_hash from users')).rows
    for (const r of [...resets, ...invites]) expect(String(r.token_hash)).toMatch(/^[0-9a-f]{64}$/)
    for (const t of [token, token2, joinToken]) {
      expect(resets.concat(invites).some(r => r.token_hash === t)).toBe(false)
    }
    for (const u of users) {
      expect(String(u.password_hash)).not.toContain('password')
      expect(String(u.password_hash)).toMatch(/^\$scrypt\$/)
    }
  })

  it('signs out every other session on a password reset or change; the member changing it stays signed in', async () => {
    const email = 'two-tabs@example.org'
    await admin.post('/api/invitations', { email, role: 'reviewer' })
    const joinToken = linkIn((await latestMailTo(admin, email)).text).split('/join/')[1]!
    expect((await new Agent(server.url).post(`/api/join/${joinToken}`, { name: 'Two Tabs', password: 'two-tabs-pass-1' })).status).toBe(200)
    const laptop = new Agent(server.url)
    const phone = new Agent(server.url)
    await laptop.signIn(email, 'two-tabs-pass-1')
    await phone.signIn(email, 'two-tabs-pass-1')
    expect((await phone.get('/api/account')).status).toBe(200)

    // Reset through the mail link, from neither session.
    const anon = new Agent(server.url)
    expect((await anon.post('/api/password-resets', { email })).status).toBe(202)
    const mail = await latestMailTo(admin, email, 5000, m => /reset/i.test(m.subject))
    const token = linkIn(mail.text).split('/reset/')[1]!
    expect((await anon.post(`/api/password-resets/${token}`, { password: 'two-tabs-pass-2' })).status).toBe(200)
    expect((await laptop.get('/api/account')).status).toBe(401)
    expect((await phone.get('/api/account')).status).toBe(401)
    expect((await phone.get('/api/session')).json).toEqual({ user: null })

    // A change from one session keeps that session and ends the other.
    await laptop.signIn(email, 'two-tabs-pass-2')
    await phone.signIn(email, 'two-tabs-pass-2')
    const changed = await laptop.post('/api/account/password', { currentPassword: 'two-tabs-pass-2', newPassword: 'two-tabs-pass-3' })
    expect(changed.status).toBe(200)
    expect((await laptop.get('/api/account')).status).toBe(200)
    expect((await phone.get('/api/account')).status).toBe(401)
    // The re-issued cookie still holds only id, name, sign-in time and session version.
    expect(Object.keys((await laptop.get('/api/_auth/session')).json.user).sort()).toEqual(['id', 'name', 'signedInAt', 'sv'])
    await phone.signIn(email, 'two-tabs-pass-3')
    expect((await phone.get('/api/account')).status).toBe(200)
  })

  it('throttles password-reset requests per address with a retry time, the same for strangers', async () => {
    const anon = new Agent(server.url)
    // Default limit: 5 requests per address per window (README configuration table).
    for (let i = 0; i < 5; i++) expect((await anon.post('/api/password-resets', { email: 'flood@example.org' })).status).toBe(202)
    const blocked = await anon.post('/api/password-resets', { email: 'flood@example.org' })
    expect(blocked.status).toBe(429)
    expect(Number(blocked.headers.get('retry-after'))).toBeGreaterThan(0)
    // Another address from the same client is still answered.
    expect((await anon.post('/api/password-resets', { email: 'other-flood@example.org' })).status).toBe(202)
  })

  it('takes away access at once when a member is deactivated or demoted', async () => {
    const email = 'short-lived@example.org'
    await admin.post('/api/invitations', { email, role: 'admin' })
    const token = linkIn((await latestMailTo(admin, email)).text).split('/join/')[1]!
    const member = new Agent(server.url)
    const joined = await member.post(`/api/join/${token}`, { name: 'Short', password: 'short-lived-1' })
    expect(joined.status).toBe(200)
    const id = joined.json.user.id
    expect((await member.get('/api/members')).status).toBe(200)
    expect((await admin.patch(`/api/members/${id}`, { role: 'viewer' })).status).toBe(200)
    expect((await member.get('/api/members')).status).toBe(403)
    expect((await admin.patch(`/api/members/${id}`, { active: false })).status).toBe(200)
    expect((await member.get('/api/account')).status).toBe(401)
    expect((await new Agent(server.url).post('/api/session', { email, password: 'short-lived-1' })).status).toBe(401)
    const events = await admin.get('/api/audit?limit=200')
    const actions = events.json.items.map((e: { action: string }) => e.action)
    expect(actions).toEqual(expect.arrayContaining(['invitation.sent', 'invitation.accepted', 'member.role-changed', 'member.deactivated', 'password-reset.requested', 'password-reset.completed']))
  })
})

describe('sign-in rate limit per client address', () => {
  it('blocks an address that fails across many accounts, with a retry time', async () => {
    // The wait after the allowed failures is the back-off (1 s × 2^(failures − 4)), not the window.
    const server = await startServer({ ISTHMUS_SIGNIN_MAX_FAILURES: '100', ISTHMUS_SIGNIN_MAX_FAILURES_PER_IP: '4', ISTHMUS_SIGNIN_WINDOW_SECONDS: '60' })
    try {
      const a = new Agent(server.url)
      for (let i = 0; i < 4; i++) expect((await a.post('/api/session', { email: `spray${i}@example.org`, password: 'guess-guess' })).status).toBe(401)
      const blocked = await a.post('/api/session', { email: 'root@example.org', password: 'root-password-123' })
      expect(blocked.status).toBe(429)
      const retry = Number(blocked.headers.get('retry-after'))
      expect(retry).toBeGreaterThan(0)
      expect(retry).toBeLessThanOrEqual(2)
      // After the back-off the right password works again.
      await new Promise(r => setTimeout(r, retry * 1000 + 200))
      expect((await a.post('/api/session', { email: 'root@example.org', password: 'root-password-123' })).status).toBe(200)
    }
    finally {
      await server.dispose()
    }
  })
})

describe('client address behind a reverse proxy', () => {
  it('takes the rightmost X-Forwarded-For entry (the proxy\'s), so a forged leftmost one changes nothing', async () => {
    const server = await startServer({ ISTHMUS_TRUST_PROXY: '1', ISTHMUS_SIGNIN_MAX_FAILURES: '100', ISTHMUS_SIGNIN_MAX_FAILURES_PER_IP: '2', ISTHMUS_SIGNIN_WINDOW_SECONDS: '60' })
    try {
      const a = new Agent(server.url)
      // The client forges a new leftmost entry each time; the proxy appends the real address.
      const viaProxy = (forged: string, real: string) => ({ 'x-forwarded-for': `${forged}, ${real}` })
      for (let i = 0; i < 2; i++) {
        expect((await a.post('/api/session', { email: `guess${i}@example.org`, password: 'guess-guess' }, viaProxy(`198.51.100.${i}`, '203.0.113.7'))).status).toBe(401)
      }
      expect((await a.post('/api/session', { email: 'guess9@example.org', password: 'guess-guess' }, viaProxy('198.51.100.99', '203.0.113.7'))).status).toBe(429)
      expect((await a.post('/api/session', { email: 'guess9@example.org', password: 'guess-guess' }, viaProxy('198.51.100.99', '203.0.113.8'))).status).toBe(401)
      const ips = (await server.sql().execute(`select distinct ip from audit_events where action = 'session.failed' order by ip`)).rows.map(r => r.ip)
      expect(ips).toEqual(['203.0.113.7', '203.0.113.8'])
    }
    finally {
      await server.dispose()
    }
  })
})

describe('sign-in rate limit under parallel guesses', () => {
  it('lets at most the allowed number of parallel bad sign-ins reach the password check', async () => {
    const server = await startServer({ ISTHMUS_SIGNIN_MAX_FAILURES: '5', ISTHMUS_SIGNIN_MAX_FAILURES_PER_IP: '1000', ISTHMUS_SIGNIN_WINDOW_SECONDS: '60' })
    try {
      // 20 guesses at once: each is charged before its password is checked, so only 5 get an answer.
      const a = new Agent(server.url)
      const results = await Promise.all(Array.from({ length: 20 }, (_, i) => a.post('/api/session', { email: 'root@example.org', password: `parallel-guess-${i}` })))
      const statuses = results.map(r => r.status)
      expect(statuses.filter(s => s !== 401 && s !== 429), 'only 401 and 429').toEqual([])
      expect(statuses.filter(s => s === 401).length).toBeLessThanOrEqual(5)
      expect(statuses.filter(s => s === 429).length).toBeGreaterThanOrEqual(15)
      for (const r of results.filter(r => r.status === 429)) expect(Number(r.headers.get('retry-after'))).toBeGreaterThan(0)
      // Refused attempts are not stored: the account holds exactly the failures that were answered 401.
      const rows = await server.sql().execute({ sql: 'select count(*) as n from signin_failures where key = ?', args: ['account:root@example.org'] })
      expect(Number(rows.rows[0]!.n)).toBe(statuses.filter(s => s === 401).length)
      // Once 5 failures are stored even the right password waits, but only for the back-off
      // (1 s × 2^(failures − 5)), not for the window: no lockout.
      const failures = statuses.filter(s => s === 401).length
      const right = await a.post('/api/session', { email: 'root@example.org', password: 'root-password-123' })
      if (right.status === 429) {
        const wait = Number(right.headers.get('retry-after'))
        expect(wait).toBeLessThanOrEqual(2)
        await new Promise(r => setTimeout(r, wait * 1000 + 100))
        expect((await a.post('/api/session', { email: 'root@example.org', password: 'root-password-123' })).status).toBe(200)
      }
      else expect(right.status).toBe(200)
      expect(failures).toBeLessThanOrEqual(5)
    }
    finally {
      await server.dispose()
    }
  })
})

describe('password-reset requests do not wait for the mail', () => {
  it('answers 202 at once for a member while SMTP stalls, audits the failed mail, and throttles per client address', async () => {
    // An SMTP server that accepts connections, says nothing for 1.5 s, then hangs up.
    const port = await freePort()
    const sockets = new Set<Socket>()
    const stalling = createNetServer((socket) => {
      sockets.add(socket)
      setTimeout(() => socket.destroy(), 1500)
    })
    await new Promise<void>(r => stalling.listen(port, '127.0.0.1', () => r()))
    const server = await startServer({ SMTP_URL: `smtp://127.0.0.1:${port}?ignoreTLS=true`, ISTHMUS_PASSWORD_RESET_MAX_PER_IP: '3' })
    try {
      const anon = new Agent(server.url)
      const started = Date.now()
      const member = await anon.post('/api/password-resets', { email: 'root@example.org' })
      const memberMs = Date.now() - started
      expect(member.status).toBe(202)
      // Waiting for the mail would take at least the 1.5 s stall.
      expect(memberMs).toBeLessThan(1000)
      const stranger = await anon.post('/api/password-resets', { email: 'stranger@example.org' })
      expect(stranger.status).toBe(202)
      expect(stranger.json).toEqual(member.json)

      const admin = new Agent(server.url)
      await admin.signIn('root@example.org', 'root-password-123')
      const deadline = Date.now() + 10_000
      let actions: string[] = []
      while (!actions.includes('password-reset.mail-failed') && Date.now() < deadline) {
        actions = (await admin.get('/api/audit?limit=50')).json.items.map((e: { action: string }) => e.action)
        await new Promise(r => setTimeout(r, 200))
      }
      expect(actions).toContain('password-reset.mail-failed')
      expect(actions).not.toContain('password-reset.requested')

      // Limit of 3 per client address here: the third is answered, the fourth refused.
      expect((await anon.post('/api/password-resets', { email: 'third@example.org' })).status).toBe(202)
      const blocked = await anon.post('/api/password-resets', { email: 'fourth@example.org' })
      expect(blocked.status).toBe(429)
      expect(Number(blocked.headers.get('retry-after'))).toBeGreaterThan(0)
    }
    finally {
      await server.dispose()
      for (const s of sockets) s.destroy()
      await new Promise<void>(r => stalling.close(() => r()))
    }
  })
})

describe('an invitation whose mail cannot be sent', () => {
  it('answers 502 naming the address, withdraws the invitation and audits both steps', async () => {
    // Nothing listens on port 9 (discard) here: the SMTP connection is refused.
    const server = await startServer({ SMTP_URL: 'smtp://127.0.0.1:9' })
    try {
      const admin = new Agent(server.url)
      await admin.signIn('root@example.org', 'root-password-123')
      const res = await admin.post('/api/invitations', { email: 'nomail@example.org', role: 'analyst' })
      expect(res.status).toBe(502)
      expect(res.json.message).toMatch(/nomail@example\.org.*withdrawn/)
      const inv = (await admin.get('/api/invitations')).json.items.find((i: { email: string }) => i.email === 'nomail@example.org')
      expect(inv.revokedAt).not.toBeNull()
      const actions = (await admin.get('/api/audit?limit=20')).json.items.map((e: { action: string }) => e.action)
      expect(actions).toContain('invitation.sent')
      expect(actions).toContain('invitation.mail-failed')
    }
    finally {
      await server.dispose()
    }
  })
})

describe('mail over real loopback SMTP in both directions', () => {
  it('sends through SMTP_URL to an outside SMTP server', async () => {
    const port = await freePort()
    const received: { to: string[], subject: string, text: string }[] = []
    const smtp = new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS'],
      onData(stream, session, cb) {
        simpleParser(stream).then((m) => {
          received.push({ to: session.envelope.rcptTo.map(r => r.address), subject: m.subject ?? '', text: m.text ?? '' })
          cb()
        }, cb)
      },
    })
    await new Promise<void>(r => smtp.listen(port, '127.0.0.1', () => r()))
    const server = await startServer({ SMTP_URL: `smtp://127.0.0.1:${port}?ignoreTLS=true` })
    try {
      const admin = new Agent(server.url)
      await admin.signIn('root@example.org', 'root-password-123')
      expect((await admin.post('/api/invitations', { email: 'outside@example.org', role: 'viewer' })).status).toBe(201)
      const deadline = Date.now() + 5000
      while (!received.length && Date.now() < deadline) await new Promise(r => setTimeout(r, 50))
      expect(received[0]?.to).toEqual(['outside@example.org'])
      expect(received[0]?.text).toContain(`${server.url}/join/`)
      // With SMTP_URL set the embedded server is not started and the mail drop stays empty.
      expect((await admin.get('/api/mail-drop')).json).toMatchObject({ total: 0, embedded: false })
    }
    finally {
      await server.dispose()
      await new Promise<void>(r => smtp.close(() => r()))
    }
  })

  it('receives mail from an outside SMTP client in the embedded mail drop', async () => {
    const localSmtpPort = await freePort()
    const server = await startServer({ ISTHMUS_LOCAL_SMTP_PORT: String(localSmtpPort) })
    try {
      const transport = createTransport({ host: '127.0.0.1', port: localSmtpPort, secure: false, ignoreTLS: true })
      await transport.sendMail({ from: 'probe@example.org', to: 'someone@example.org', subject: 'Loopback probe', text: 'Hello over SMTP' })
      const admin = new Agent(server.url)
      await admin.signIn('root@example.org', 'root-password-123')
      const mail = await latestMailTo(admin, 'someone@example.org')
      expect(mail.subject).toBe('Loopback probe')
      expect(mail.text.trim()).toBe('Hello over SMTP')
    }
    finally {
      await server.dispose()
    }
  })
})
