import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import { randomBytes } from 'node:crypto'
import { eq } from 'drizzle-orm'

let ready: Promise<void> | undefined

/**
 * Everything the server needs before it answers: session secret, database (migrated), the
 * embedded mail server when no SMTP_URL is set, the first admin and, in demo mode, the demo team.
 * Nitro does not await async plugins, so every request awaits this one promise.
 */
export function serverReady(): Promise<void> {
  ready ??= (async () => {
    const config = useConfig()
    ensureSessionPassword(config)
    const db = await openDatabase()
    if (!config.smtpUrl) {
      const port = await startLocalSmtp(db, config.localSmtpPort)
      console.info(`[isthmus] local mail drop listening on 127.0.0.1:${port}`)
    }
    // The embedded engine's threads start with the app; with Redis, worker processes run the tasks.
    if (!config.redisUrl) useWorkerPool().prestart()
    await ensureFirstAdmin(db)
    // Work left behind by an earlier run is settled first, so the demo's own new jobs are not
    // mistaken for interrupted ones.
    await afterStartHooks.reduce((p, hook) => p.then(() => hook(db)), Promise.resolve())
    if (config.demo) await seedDemo(db)
  })()
  return ready
}

/** Work other modules register to run once the database is ready (e.g. marking stale jobs failed). */
const afterStartHooks: ((db: DB) => Promise<void>)[] = []
export function onServerReady(hook: (db: DB) => Promise<void>) {
  afterStartHooks.push(hook)
}

function ensureSessionPassword(config: IsthmusConfig) {
  const current = sessionPassword()
  if (current && current.length >= 32) return
  if (current) throw new Error('NUXT_SESSION_PASSWORD must be at least 32 characters long')
  if (!config.demo) {
    throw new Error('NUXT_SESSION_PASSWORD is not set. Set it to a random string of 32+ characters (demo mode generates one).')
  }
  mkdirSync(config.dataDir, { recursive: true })
  const file = join(config.dataDir, 'session-secret')
  if (!existsSync(file)) writeFileSync(file, randomBytes(32).toString('base64url'), { mode: 0o600 })
  setSessionPassword(readFileSync(file, 'utf8').trim())
}

async function ensureFirstAdmin(db: DB) {
  const admin = useConfig().firstAdmin
  if (!admin) return
  const { email, password, name } = admin
  const existing = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, email)).get()
  if (existing) return
  const [user] = await db.insert(schema.users).values({
    email, name, role: 'admin', passwordHash: await hashPassword(password),
  }).returning({ id: schema.users.id })
  await audit(null, { actorId: null, action: 'member.bootstrap', subjectType: 'user', subjectId: user!.id, detail: { email } }, db)
}
