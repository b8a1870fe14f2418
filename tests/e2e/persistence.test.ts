import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Agent, latestMailTo } from './support/http'
import { startServer, type RunningServer } from './support/server'

describe('restarts keep data; migrations run once', () => {
  let server: RunningServer
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1' })
  })
  afterAll(() => server?.dispose())

  it('keeps members, invitations, mail and sessions across a restart, and the demo seed stays idempotent', async () => {
    const admin = new Agent(server.url)
    await admin.signIn('admin@example.org', 'isthmus-demo')
    expect((await admin.post('/api/invitations', { email: 'kept@example.org', role: 'reviewer' })).status).toBe(201)
    await latestMailTo(admin, 'kept@example.org')
    const before = (await admin.get('/api/members')).json.total
    const migrations = async () => Number((await server.sql().execute('select count(*) as n from __drizzle_migrations')).rows[0]!.n)
    const migrationsBefore = await migrations()
    expect(migrationsBefore).toBeGreaterThan(0)

    await server.restart()
    await server.restart()

    // The sealed cookie still opens a session: same secret, same database.
    expect((await admin.get('/api/session')).json.user.email).toBe('admin@example.org')
    expect((await admin.get('/api/members')).json.total).toBe(before)
    expect((await admin.get('/api/invitations')).json.items.some((i: { email: string }) => i.email === 'kept@example.org')).toBe(true)
    await latestMailTo(admin, 'kept@example.org')
    expect(await migrations()).toBe(migrationsBefore)
    const demoSeeds = await server.sql().execute(`select count(*) as n from users where email like '%@example.org' and email in ('admin@example.org','analyst@example.org','reviewer@example.org','viewer@example.org')`)
    expect(Number(demoSeeds.rows[0]!.n)).toBe(4)
  })

  it('refuses to start outside demo mode without a session secret', async () => {
    const { spawnSync } = await import('node:child_process')
    const res = spawnSync(process.execPath, ['.output/server/index.mjs'], {
      env: { PATH: process.env.PATH ?? '', PORT: '0', HOST: '127.0.0.1', DATABASE_URL: `file:${server.dataDir}/other.db` },
      encoding: 'utf8',
      timeout: 20_000,
    })
    expect(res.status).not.toBe(0)
    expect(res.stdout + res.stderr).toMatch(/NUXT_SESSION_PASSWORD is not set/)
  })

  it('stops with a clear message when its port is taken, instead of running on unreachable', async () => {
    const { spawn } = await import('node:child_process')
    const child = spawn(process.execPath, ['.output/server/index.mjs'], {
      env: { ...server.env, PATH: process.env.PATH ?? '', PORT: String(server.port), DATABASE_URL: `file:${server.dataDir}/taken.db`, UPLOADS_DIR: `${server.dataDir}/taken-uploads` },
      stdio: ['ignore', 'pipe', 'pipe'],
    })
    let output = ''
    child.stdout!.on('data', (d: Buffer) => { output += d })
    child.stderr!.on('data', (d: Buffer) => { output += d })
    const code = await new Promise<number | null>((resolve) => {
      const timer = setTimeout(() => { child.kill('SIGKILL'); resolve(null) }, 20_000)
      child.once('exit', (c) => { clearTimeout(timer); resolve(c) })
    })
    expect(code, output).toBe(1)
    expect(output).toMatch(/cannot listen on 127\.0\.0\.1:\d+ \(EADDRINUSE\)/)
    expect((await fetch(`${server.url}/api/health`)).ok).toBe(true)
  })
})
