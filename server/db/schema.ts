import { sql } from 'drizzle-orm'
import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'
import type { Role } from '../../shared/types/roles'

const createdAt = () => integer('created_at', { mode: 'timestamp_ms' }).notNull().default(sql`(unixepoch('subsec') * 1000)`)

export const users = sqliteTable('users', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  email: text('email').notNull(),
  name: text('name').notNull(),
  role: text('role').$type<Role>().notNull(),
  passwordHash: text('password_hash').notNull(),
  active: integer('active', { mode: 'boolean' }).notNull().default(true),
  lastSignInAt: integer('last_sign_in_at', { mode: 'timestamp_ms' }),
  createdAt: createdAt(),
}, t => [uniqueIndex('users_email_unique').on(t.email)])

export const invitations = sqliteTable('invitations', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  email: text('email').notNull(),
  role: text('role').$type<Role>().notNull(),
  /** sha256 of the one-time token; the token itself exists only in the mail. */
  tokenHash: text('token_hash').notNull(),
  invitedBy: integer('invited_by').notNull().references(() => users.id),
  expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
  acceptedAt: integer('accepted_at', { mode: 'timestamp_ms' }),
  acceptedUserId: integer('accepted_user_id').references(() => users.id),
  revokedAt: integer('revoked_at', { mode: 'timestamp_ms' }),
  createdAt: createdAt(),
}, t => [uniqueIndex('invitations_token_unique').on(t.tokenHash), index('invitations_email_idx').on(t.email)])

export const passwordResets = sqliteTable('password_resets', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  userId: integer('user_id').notNull().references(() => users.id),
  tokenHash: text('token_hash').notNull(),
  expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
  usedAt: integer('used_at', { mode: 'timestamp_ms' }),
  createdAt: createdAt(),
}, t => [uniqueIndex('password_resets_token_unique').on(t.tokenHash)])

export const apiTokens = sqliteTable('api_tokens', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  userId: integer('user_id').notNull().references(() => users.id),
  label: text('label').notNull(),
  /** sha256 of the token; the token is shown once at creation. */
  tokenHash: text('token_hash').notNull(),
  /** First characters of the token, to tell tokens apart in lists. */
  prefix: text('prefix').notNull(),
  lastUsedAt: integer('last_used_at', { mode: 'timestamp_ms' }),
  revokedAt: integer('revoked_at', { mode: 'timestamp_ms' }),
  createdAt: createdAt(),
}, t => [uniqueIndex('api_tokens_hash_unique').on(t.tokenHash), index('api_tokens_user_idx').on(t.userId)])

export const auditEvents = sqliteTable('audit_events', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  actorId: integer('actor_id').references(() => users.id),
  action: text('action').notNull(),
  subjectType: text('subject_type'),
  subjectId: text('subject_id'),
  detail: text('detail', { mode: 'json' }).$type<Record<string, unknown>>(),
  ip: text('ip'),
  createdAt: createdAt(),
}, t => [index('audit_events_created_idx').on(t.createdAt), index('audit_events_actor_idx').on(t.actorId)])

/** Failed sign-in attempts, keyed by account and by client address, for rate limiting. */
export const signinFailures = sqliteTable('signin_failures', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  key: text('key').notNull(),
  at: integer('at', { mode: 'timestamp_ms' }).notNull(),
}, t => [index('signin_failures_key_at_idx').on(t.key, t.at)])

/** Messages received by the embedded loopback SMTP server (demo and single-machine use). */
export const mailMessages = sqliteTable('mail_messages', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  envelopeFrom: text('envelope_from'),
  envelopeTo: text('envelope_to', { mode: 'json' }).$type<string[]>().notNull(),
  subject: text('subject').notNull().default(''),
  text: text('text').notNull().default(''),
  html: text('html'),
  raw: text('raw').notNull(),
  receivedAt: createdAt(),
}, t => [index('mail_messages_received_idx').on(t.receivedAt)])

export type User = typeof users.$inferSelect
export type AuditEvent = typeof auditEvents.$inferSelect
export type MailMessage = typeof mailMessages.$inferSelect

/** A stored mesh file, by content hash. Lobes reference it; the file is removed with its last lobe. */
export const meshFiles = sqliteTable('mesh_files', {
  sha256: text('sha256').primaryKey(),
  format: text('format').$type<'obj' | 'ply'>().notNull(),
  byteSize: integer('byte_size').notNull(),
  /** Path relative to UPLOADS_DIR. */
  storedPath: text('stored_path').notNull(),
  createdAt: createdAt(),
})

export type JobStatus = 'queued' | 'running' | 'done' | 'failed' | 'cancelled'

/** One lobe: a validated mesh file at stated units, density and (optional) spin. */
export const lobes = sqliteTable('lobes', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  name: text('name').notNull(),
  ownerId: integer('owner_id').notNull().references(() => users.id),
  sha256: text('sha256').notNull().references(() => meshFiles.sha256),
  sourceFileName: text('source_file_name').notNull(),
  format: text('format').$type<'obj' | 'ply'>().notNull(),
  units: text('units').$type<'m' | 'km'>().notNull(),
  /** kg m⁻³ */
  density: real('density').notNull(),
  /** m; null → the volume-equivalent radius. */
  referenceRadius: real('reference_radius'),
  /** Spin period for the surface slope, hours; null → not rotating. */
  spinPeriodHours: real('spin_period_hours'),
  /** Spin axis, file frame (unit); null → the largest-moment axis. */
  spinAxis: text('spin_axis', { mode: 'json' }).$type<[number, number, number] | null>(),
  vertexCount: integer('vertex_count').notNull(),
  faceCount: integer('face_count').notNull(),
  warnings: text('warnings', { mode: 'json' }).$type<{ code: string, message: string }[]>().notNull(),
  report: text('report', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
  /** Mass properties at `density` (SI), as the core computed them. */
  properties: text('properties', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
  /** Surface-field summary once its job is done. */
  surface: text('surface', { mode: 'json' }).$type<Record<string, unknown> | null>(),
  algorithmVersion: text('algorithm_version').notNull(),
  createdAt: createdAt(),
}, t => [index('lobes_owner_idx').on(t.ownerId), index('lobes_sha_idx').on(t.sha256), index('lobes_created_idx').on(t.createdAt)])

/** Background work with progress: surface fields of a lobe, and so on. */
export const jobs = sqliteTable('jobs', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  kind: text('kind').notNull(),
  lobeId: integer('lobe_id').references(() => lobes.id, { onDelete: 'cascade' }),
  status: text('status').$type<JobStatus>().notNull().default('queued'),
  progress: real('progress').notNull().default(0),
  stage: text('stage'),
  error: text('error'),
  /** Parameters the job ran with (e.g. evaluation-point count). */
  params: text('params', { mode: 'json' }).$type<Record<string, unknown>>(),
  createdAt: createdAt(),
  startedAt: integer('started_at', { mode: 'timestamp_ms' }),
  finishedAt: integer('finished_at', { mode: 'timestamp_ms' }),
}, t => [index('jobs_lobe_idx').on(t.lobeId), index('jobs_status_idx').on(t.status)])

/** A contact study of two lobes for one approach. */
export const studies = sqliteTable('studies', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  ownerId: integer('owner_id').notNull().references(() => users.id),
  lobeAId: integer('lobe_a_id').notNull().references(() => lobes.id),
  lobeBId: integer('lobe_b_id').notNull().references(() => lobes.id),
  title: text('title'),
  /** The validated request body, SI units. */
  input: text('input', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
  /** sha256 of (mesh hashes, inputs, algorithm version): equal keys reuse a result. */
  cacheKey: text('cache_key').notNull(),
  status: text('status').$type<JobStatus>().notNull().default('queued'),
  progress: real('progress').notNull().default(0),
  stage: text('stage'),
  error: text('error'),
  result: text('result', { mode: 'json' }).$type<Record<string, unknown> | null>(),
  algorithmVersion: text('algorithm_version').notNull(),
  createdAt: createdAt(),
  startedAt: integer('started_at', { mode: 'timestamp_ms' }),
  finishedAt: integer('finished_at', { mode: 'timestamp_ms' }),
}, t => [index('studies_pair_idx').on(t.lobeAId, t.lobeBId), index('studies_cache_idx').on(t.cacheKey), index('studies_created_idx').on(t.createdAt)])

export type Lobe = typeof lobes.$inferSelect
export type Study = typeof studies.$inferSelect
export type Job = typeof jobs.$inferSelect
