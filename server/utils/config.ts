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
  maxUploadBytes: number
  invitationTtlMs: number
  passwordResetTtlMs: number
  /** Password-reset requests allowed per e-mail address, and per client address, within the window. */
  passwordResetMaxPerAddress: number
  passwordResetMaxPerIp: number
  passwordResetWindowMs: number
}

function int(name: string, fallback: number): number {
  const raw = process.env[name]
  if (raw === undefined || raw === '') return fallback
  const n = Number(raw)
  if (!Number.isFinite(n) || n < 0) throw new Error(`${name} must be a non-negative number, got "${raw}"`)
  return n
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
    maxUploadBytes: int('ISTHMUS_MAX_UPLOAD_MB', 512) * 1024 * 1024,
    invitationTtlMs: int('ISTHMUS_INVITATION_TTL_HOURS', 7 * 24) * 3600_000,
    passwordResetTtlMs: int('ISTHMUS_PASSWORD_RESET_TTL_MINUTES', 60) * 60_000,
    passwordResetMaxPerAddress: int('ISTHMUS_PASSWORD_RESET_MAX_PER_ADDRESS', 5),
    passwordResetMaxPerIp: int('ISTHMUS_PASSWORD_RESET_MAX_PER_IP', 20),
    passwordResetWindowMs: int('ISTHMUS_PASSWORD_RESET_WINDOW_MINUTES', 60) * 60_000,
  }
  return cached
}

/** Folder of the running server entry (`.output/server` when built). */
export function serverEntryDir(): string {
  return process.argv[1] ? dirname(resolve(process.argv[1])) : dirname(fileURLToPath(import.meta.url))
}
