import { sql } from 'drizzle-orm'
import { index, integer, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'
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
