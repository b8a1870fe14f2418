import { availableParallelism } from 'node:os'
import { dirname, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'

/**
 * Server configuration, read once from the environment (so the built server honours it as well
 * as `nuxt dev`). Every variable is documented in README.md.
 */
export interface IsthmusConfig {
  /** libSQL URL: `file:./data/isthmus.db` (default) or `libsql://…` for a libSQL server. */
  databaseUrl: string
  /** Auth token for a libSQL server URL (unused for files). */
  databaseAuthToken?: string
  /** Folder beside a file database, for the generated session secret. */
  dataDir: string
  uploadsDir: string
  /** Outgoing mail. Absent → the embedded loopback SMTP server. */
  smtpUrl?: string
  /** Port of the embedded SMTP server; 0 picks a free one. */
  localSmtpPort: number
  mailFrom: string
  /** Origin used to build links in mails, never the request's Host header. */
  publicUrl: string
  demo: boolean
  /** Failed sign-ins allowed per account, and per client address, within the window. */
  signinMaxFailures: number
  signinMaxFailuresPerIp: number
  signinWindowMs: number
  /**
   * Back-off once a key holds its allowed failures: the next attempt waits base × 2^(failures −
   * allowed), capped per account and per client address (a capped account wait keeps the owner
   * able to sign in while strangers guess; the address wait grows longer).
   */
  signinBackoffBaseMs: number
  signinBackoffMaxMs: number
  signinBackoffMaxMsPerIp: number
  /**
   * `Secure` flag of the session cookie: 'auto' (default) sets it when the public URL is https, the
   * request came over https, or the host is loopback (browsers keep Secure cookies there); 'always'
   * and 'never' force it.
   */
  cookieSecure: 'auto' | 'always' | 'never'
  maxUploadBytes: number
  invitationTtlMs: number
  passwordResetTtlMs: number
  /** Password-reset requests allowed per e-mail address, and per client address, within the window. */
  passwordResetMaxPerAddress: number
  passwordResetMaxPerIp: number
  passwordResetWindowMs: number
  /** `ISTHMUS_TRUST_PROXY=1`: the client address is the rightmost `X-Forwarded-For` entry. */
  trustProxy: boolean
  /** Folder of SQL migrations set by `ISTHMUS_MIGRATIONS_DIR` (else the built or source folder). */
  migrationsDir?: string
  /** Demo mode seeds the demo contact study too (`ISTHMUS_DEMO_STUDY`, default on). */
  demoStudy: boolean
  /** Face budget of the display copy sent to the 3D view (at least 1000). */
  displayFaces: number
  /** Worker threads: `ISTHMUS_WORKERS`, else the number of cores; between 1 and 8. */
  workers: number
  /** Folder holding the worker script, when a deployment moves it (`ISTHMUS_WORKERS_DIR`). */
  workersDir?: string
  /** Niceness of worker threads on Linux (`ISTHMUS_WORKER_NICE`). */
  workerNice: number
  /** First admin created on start outside demo mode, when both e-mail and password are set. */
  firstAdmin?: { email: string, password: string, name: string }
  /** Redis for the distributed job engine (BullMQ); absent → the embedded engine in the app process. */
  redisUrl?: string
  /** How long a worker process may hold a task without renewing its lock before another takes it over, ms. */
  taskLockMs: number
  /** S3-compatible object store for meshes and derived files; absent → the folder `uploadsDir`. */
  s3?: { endpoint: string, bucket: string, region: string, accessKeyId?: string, secretAccessKey?: string, prefix: string }
  /** Minutes between checks for due proposal digests (daily per member); 0 turns the schedule off. */
  recordDigestCheckMinutes: number
}

function int(name: string, fallback: number): number {
  const raw = process.env[name]
  if (raw === undefined || raw === '') return fallback
  const n = Number(raw)
  if (!Number.isFinite(n) || n < 0) throw new Error(`${name} must be a non-negative number, got "${raw}"`)
  return n
}

/** Lenient reading for tuning knobs: anything not a positive number gives the fallback. */
function tuning(name: string, fallback: number): number {
  return Number(process.env[name]) || fallback
}

/** S3_ENDPOINT and S3_BUCKET (both or neither), S3_REGION, S3_ACCESS_KEY_ID, S3_SECRET_ACCESS_KEY, S3_PREFIX. */
function s3Settings(): IsthmusConfig['s3'] {
  const env = process.env
  if (!env.S3_ENDPOINT && !env.S3_BUCKET) return undefined
  if (!env.S3_ENDPOINT || !env.S3_BUCKET) throw new Error('Set both S3_ENDPOINT and S3_BUCKET for the object store (or neither for the local folder)')
  return {
    endpoint: env.S3_ENDPOINT, bucket: env.S3_BUCKET, region: env.S3_REGION || 'us-east-1',
    accessKeyId: env.S3_ACCESS_KEY_ID || env.AWS_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY || env.AWS_SECRET_ACCESS_KEY,
    prefix: (env.S3_PREFIX ?? '').replace(/^\/+|\/+$/g, ''),
  }
}

function cookieSecureSetting(raw: string | undefined): IsthmusConfig['cookieSecure'] {
  if (raw === undefined || raw === '' || raw === 'auto') return 'auto'
  if (raw === '1' || raw === 'true' || raw === 'always') return 'always'
  if (raw === '0' || raw === 'false' || raw === 'never') return 'never'
  throw new Error(`ISTHMUS_COOKIE_SECURE must be auto, always or never, got "${raw}"`)
}

let cached: IsthmusConfig | undefined

export function useConfig(): IsthmusConfig {
  if (cached) return cached
  const databaseUrl = process.env.DATABASE_URL || 'file:./data/isthmus.db'
  const dataDir = databaseUrl.startsWith('file:')
    ? dirname(resolve(databaseUrl.slice('file:'.length).replace(/^\/\/(localhost)?(?=\/)/, '')))
    : resolve('./data')
  // Same order as Nitro's node server, so the default public URL names the port it listens on.
  const port = process.env.NITRO_PORT || process.env.PORT || '3000'
  cached = {
    databaseUrl,
    databaseAuthToken: process.env.DATABASE_AUTH_TOKEN || undefined,
    dataDir,
    uploadsDir: resolve(process.env.UPLOADS_DIR || './uploads'),
    smtpUrl: process.env.SMTP_URL || undefined,
    localSmtpPort: int('ISTHMUS_LOCAL_SMTP_PORT', 0),
    mailFrom: process.env.ISTHMUS_MAIL_FROM || 'Isthmus <isthmus@localhost>',
    publicUrl: (process.env.ISTHMUS_PUBLIC_URL || `http://localhost:${port}`).replace(/\/+$/, ''),
    demo: process.env.ISTHMUS_DEMO === '1' || process.env.ISTHMUS_DEMO === 'true',
    signinMaxFailures: int('ISTHMUS_SIGNIN_MAX_FAILURES', 10),
    signinMaxFailuresPerIp: int('ISTHMUS_SIGNIN_MAX_FAILURES_PER_IP', int('ISTHMUS_SIGNIN_MAX_FAILURES', 10)),
    signinWindowMs: int('ISTHMUS_SIGNIN_WINDOW_SECONDS', 15 * 60) * 1000,
    signinBackoffBaseMs: int('ISTHMUS_SIGNIN_BACKOFF_BASE_SECONDS', 1) * 1000,
    signinBackoffMaxMs: int('ISTHMUS_SIGNIN_BACKOFF_MAX_SECONDS', 60) * 1000,
    signinBackoffMaxMsPerIp: int('ISTHMUS_SIGNIN_BACKOFF_MAX_SECONDS_PER_IP', 15 * 60) * 1000,
    cookieSecure: cookieSecureSetting(process.env.ISTHMUS_COOKIE_SECURE),
    maxUploadBytes: int('ISTHMUS_MAX_UPLOAD_MB', 512) * 1024 * 1024,
    invitationTtlMs: int('ISTHMUS_INVITATION_TTL_HOURS', 7 * 24) * 3600_000,
    passwordResetTtlMs: int('ISTHMUS_PASSWORD_RESET_TTL_MINUTES', 60) * 60_000,
    passwordResetMaxPerAddress: int('ISTHMUS_PASSWORD_RESET_MAX_PER_ADDRESS', 5),
    passwordResetMaxPerIp: int('ISTHMUS_PASSWORD_RESET_MAX_PER_IP', 20),
    passwordResetWindowMs: int('ISTHMUS_PASSWORD_RESET_WINDOW_MINUTES', 60) * 60_000,
    trustProxy: process.env.ISTHMUS_TRUST_PROXY === '1',
    migrationsDir: process.env.ISTHMUS_MIGRATIONS_DIR || undefined,
    demoStudy: process.env.ISTHMUS_DEMO_STUDY !== '0',
    displayFaces: Math.max(1000, tuning('ISTHMUS_DISPLAY_FACES', 300_000)),
    workers: Math.max(1, Math.min(tuning('ISTHMUS_WORKERS', availableParallelism()), 8)),
    workersDir: process.env.ISTHMUS_WORKERS_DIR || undefined,
    workerNice: Number(process.env.ISTHMUS_WORKER_NICE ?? 10),
    firstAdmin: firstAdmin(),
    redisUrl: process.env.REDIS_URL || undefined,
    taskLockMs: Math.max(2, tuning('ISTHMUS_TASK_LOCK_SECONDS', 15)) * 1000,
    s3: s3Settings(),
    recordDigestCheckMinutes: int('ISTHMUS_RECORD_DIGEST_CHECK_MINUTES', 15),
  }
  return cached
}

function firstAdmin(): IsthmusConfig['firstAdmin'] {
  const email = process.env.ISTHMUS_ADMIN_EMAIL?.trim().toLowerCase()
  const password = process.env.ISTHMUS_ADMIN_PASSWORD
  return email && password ? { email, password, name: process.env.ISTHMUS_ADMIN_NAME || 'Administrator' } : undefined
}

/**
 * The secret sealing session cookies. Read at call time, not cached: in demo mode the server
 * generates one at start and hands it to nuxt-auth-utils through the same variable.
 */
export function sessionPassword(): string | undefined {
  return process.env.NUXT_SESSION_PASSWORD || undefined
}

/** Hands the session secret to nuxt-auth-utils, which reads it from the environment itself. */
export function setSessionPassword(secret: string) {
  process.env.NUXT_SESSION_PASSWORD = secret
}

/** Folder of the running server entry (`.output/server` when built). */
export function serverEntryDir(): string {
  return process.argv[1] ? dirname(resolve(process.argv[1])) : dirname(fileURLToPath(import.meta.url))
}
