import { sql } from 'drizzle-orm'
import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'
import type { Role } from '#shared/types/roles'
import type { ProposalMailMode } from '#shared/types/records'
import type { LobeReport, SurfaceSummary } from '#shared/types/lobes'
import type { StoredStudyInput, StudyResult } from '#shared/types/studies'

const createdAt = () => integer('created_at', { mode: 'timestamp_ms' }).notNull().default(sql`(unixepoch('subsec') * 1000)`)

export const users = sqliteTable('users', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  email: text('email').notNull(),
  name: text('name').notNull(),
  role: text('role').$type<Role>().notNull(),
  passwordHash: text('password_hash').notNull(),
  active: integer('active', { mode: 'boolean' }).notNull().default(true),
  lastSignInAt: integer('last_sign_in_at', { mode: 'timestamp_ms' }),
  /** Last password change or reset: sessions signed in before it are refused. */
  credentialsChangedAt: integer('credentials_changed_at', { mode: 'timestamp_ms' }),
  /**
   * Sessions carry the version they were signed in under and are refused once it moves on: sign-out,
   * password change, password reset and deactivation each add one, ending every session at once.
   */
  sessionVersion: integer('session_version').notNull().default(0),
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
  report: text('report', { mode: 'json' }).$type<LobeReport>().notNull(),
  /** Mass properties at `density` (SI), as the core computed them. */
  properties: text('properties', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
  /** Surface-field summary once its job is done. */
  surface: text('surface', { mode: 'json' }).$type<SurfaceSummary | null>(),
  /** The job whose result `surface` takes (jobs.id; shared by lobes with identical inputs); only it may write `surface`. */
  surfaceJobId: integer('surface_job_id'),
  algorithmVersion: text('algorithm_version').notNull(),
  createdAt: createdAt(),
}, t => [index('lobes_owner_idx').on(t.ownerId), index('lobes_sha_idx').on(t.sha256), index('lobes_created_idx').on(t.createdAt)])

/**
 * Background work with progress (server/utils/jobs.ts): surface fields of a lobe, a contact study,
 * and so on. Identical jobs (kind, inputs hash, algorithm version) run once and are shared.
 */
export const jobs = sqliteTable('jobs', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  kind: text('kind').notNull(),
  /** Who asked first (null for work the server started itself). */
  ownerId: integer('owner_id').references(() => users.id),
  /** sha256 of everything that decides the result (mesh hashes, parameters). */
  inputsHash: text('inputs_hash'),
  algorithmVersion: text('algorithm_version'),
  /** Times the job started running (a restart or lost worker runs it again, up to a bound). */
  attempts: integer('attempts').notNull().default(0),
  /** The lobe it was first made for (surface fields). */
  lobeId: integer('lobe_id').references(() => lobes.id, { onDelete: 'cascade' }),
  /** The study it was first made for (contact studies). */
  studyId: integer('study_id'),
  /** The job's summary result, so an identical later job can reuse it. */
  result: text('result', { mode: 'json' }).$type<Record<string, unknown> | null>(),
  status: text('status').$type<JobStatus>().notNull().default('queued'),
  progress: real('progress').notNull().default(0),
  stage: text('stage'),
  error: text('error'),
  /** Parameters the job ran with (e.g. evaluation-point count). */
  params: text('params', { mode: 'json' }).$type<Record<string, unknown>>(),
  createdAt: createdAt(),
  startedAt: integer('started_at', { mode: 'timestamp_ms' }),
  finishedAt: integer('finished_at', { mode: 'timestamp_ms' }),
}, t => [index('jobs_lobe_idx').on(t.lobeId), index('jobs_status_idx').on(t.status), index('jobs_inputs_idx').on(t.kind, t.inputsHash)])

/** A contact study of two lobes for one approach. */
export const studies = sqliteTable('studies', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  ownerId: integer('owner_id').notNull().references(() => users.id),
  lobeAId: integer('lobe_a_id').notNull().references(() => lobes.id),
  lobeBId: integer('lobe_b_id').notNull().references(() => lobes.id),
  title: text('title'),
  /** The validated request body, SI units. */
  input: text('input', { mode: 'json' }).$type<StoredStudyInput>().notNull(),
  /** sha256 of (mesh hashes, inputs, algorithm version): equal keys reuse a result. */
  cacheKey: text('cache_key').notNull(),
  status: text('status').$type<JobStatus>().notNull().default('queued'),
  progress: real('progress').notNull().default(0),
  stage: text('stage'),
  error: text('error'),
  result: text('result', { mode: 'json' }).$type<StudyResult | null>(),
  algorithmVersion: text('algorithm_version').notNull(),
  /** The job computing it (jobs.id; shared by studies with the same cache key). */
  jobId: integer('job_id'),
  createdAt: createdAt(),
  startedAt: integer('started_at', { mode: 'timestamp_ms' }),
  finishedAt: integer('finished_at', { mode: 'timestamp_ms' }),
}, t => [index('studies_pair_idx').on(t.lobeAId, t.lobeBId), index('studies_cache_idx').on(t.cacheKey), index('studies_created_idx').on(t.createdAt)])

export type Lobe = typeof lobes.$inferSelect
export type Study = typeof studies.$inferSelect
export type Job = typeof jobs.$inferSelect

// ─── Object records ──────────────────────────────────────────────────────────────────────────────
// Shared per-object records, the derived values attached to them (frozen snapshots with provenance),
// their review, comments, follows and mail preferences. Sized for 10 000 records and 100 000
// attachments: every list, filter and join below has an index.

/** One record per object, with the designation and name chosen by the team. */
export const objects = sqliteTable('objects', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  designation: text('designation').notNull(),
  name: text('name').notNull(),
  population: text('population').$type<'kuiper-belt' | 'jupiter-family-comet' | 'near-earth' | 'main-belt' | 'other'>().notNull(),
  notes: text('notes').notNull().default(''),
  /** Heliocentric orbit: semi-major axis in au, eccentricity, inclination in degrees (all or none). */
  orbitAAu: real('orbit_a_au'),
  orbitE: real('orbit_e'),
  orbitIDeg: real('orbit_i_deg'),
  /** Sorted, lower-case; `object_tags` holds the same tags for filtering. */
  tags: text('tags', { mode: 'json' }).$type<string[]>().notNull().default(sql`'[]'`),
  createdBy: integer('created_by').notNull().references(() => users.id),
  createdAt: createdAt(),
  updatedAt: integer('updated_at', { mode: 'timestamp_ms' }).notNull().default(sql`(unixepoch('subsec') * 1000)`),
  /** Attachments in each state, kept by triggers on `attachments` (migration 0003): list sorts read them. */
  proposedCount: integer('proposed_count').notNull().default(0),
  acceptedCount: integer('accepted_count').notNull().default(0),
}, t => [
  index('objects_proposed_count_idx').on(t.proposedCount),
  index('objects_accepted_count_idx').on(t.acceptedCount),
  uniqueIndex('objects_designation_unique').on(sql`${t.designation} collate nocase`),
  index('objects_name_idx').on(sql`${t.name} collate nocase`),
  index('objects_population_idx').on(t.population, sql`${t.designation} collate nocase`),
  index('objects_created_idx').on(t.createdAt),
  index('objects_updated_idx').on(t.updatedAt),
])

export const objectTags = sqliteTable('object_tags', {
  objectId: integer('object_id').notNull().references(() => objects.id, { onDelete: 'cascade' }),
  tag: text('tag').notNull(),
}, t => [uniqueIndex('object_tags_unique').on(t.objectId, t.tag), index('object_tags_tag_idx').on(t.tag, t.objectId)])

/** Lobes and studies linked to a record: by hand (`manual`) or because a value was attached from them. */
export const objectLinks = sqliteTable('object_links', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  objectId: integer('object_id').notNull().references(() => objects.id, { onDelete: 'cascade' }),
  lobeId: integer('lobe_id').references(() => lobes.id),
  studyId: integer('study_id').references(() => studies.id),
  via: text('via').$type<'manual' | 'attachment'>().notNull(),
  linkedBy: integer('linked_by').notNull().references(() => users.id),
  createdAt: createdAt(),
}, t => [
  uniqueIndex('object_links_lobe_unique').on(t.objectId, t.lobeId).where(sql`${t.lobeId} is not null`),
  uniqueIndex('object_links_study_unique').on(t.objectId, t.studyId).where(sql`${t.studyId} is not null`),
  index('object_links_lobe_idx').on(t.lobeId),
  index('object_links_study_idx').on(t.studyId),
])

export type AttachmentStateDb = 'proposed' | 'accepted' | 'rejected' | 'superseded'

/**
 * One derived value attached to a record: a frozen snapshot (value as a JSON number or array of
 * numbers — float64, never rounded), its unit, spread, subject, reference radius and provenance.
 * Values are never deleted: an accepted value replaced by a newer one becomes `superseded`.
 */
export const attachments = sqliteTable('attachments', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  objectId: integer('object_id').notNull().references(() => objects.id),
  quantityKey: text('quantity_key').notNull(),
  subject: text('subject').$type<'lobe-a' | 'lobe-b' | 'whole-body' | 'merged-body' | 'lobe-pair'>().notNull(),
  value: text('value', { mode: 'json' }).$type<number | number[]>().notNull(),
  unit: text('unit').notNull(),
  spread: text('spread', { mode: 'json' }).$type<Record<string, number | string> | null>(),
  /** m; null for quantities without one. */
  referenceRadius: real('reference_radius'),
  /** quantity|subject|reference radius: accepted values of one group supersede each other. */
  supersedeGroup: text('supersede_group').notNull(),
  lobeId: integer('lobe_id').references(() => lobes.id),
  studyId: integer('study_id').references(() => studies.id),
  provenance: text('provenance', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
  note: text('note').notNull().default(''),
  state: text('state').$type<AttachmentStateDb>().notNull().default('proposed'),
  proposedBy: integer('proposed_by').notNull().references(() => users.id),
  proposedAt: integer('proposed_at', { mode: 'timestamp_ms' }).notNull().default(sql`(unixepoch('subsec') * 1000)`),
  reviewedBy: integer('reviewed_by').references(() => users.id),
  reviewedAt: integer('reviewed_at', { mode: 'timestamp_ms' }),
  reviewComment: text('review_comment'),
  supersededBy: integer('superseded_by'),
  supersededAt: integer('superseded_at', { mode: 'timestamp_ms' }),
}, t => [
  index('attachments_object_state_idx').on(t.objectId, t.state),
  index('attachments_object_group_idx').on(t.objectId, t.supersedeGroup, t.state),
  // At most one current (accepted) value per record and group, enforced by the database.
  uniqueIndex('attachments_current_unique').on(t.objectId, t.supersedeGroup).where(sql`${t.state} = 'accepted'`),
  index('attachments_state_object_idx').on(t.state, t.objectId),
  index('attachments_lobe_idx').on(t.lobeId),
  index('attachments_study_idx').on(t.studyId),
  index('attachments_proposer_idx').on(t.proposedBy),
])

/** Comment thread per attachment; review decisions appear here too (kind 'decision'). */
export const attachmentComments = sqliteTable('attachment_comments', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  attachmentId: integer('attachment_id').notNull().references(() => attachments.id),
  authorId: integer('author_id').notNull().references(() => users.id),
  kind: text('kind').$type<'comment' | 'decision'>().notNull().default('comment'),
  body: text('body').notNull(),
  createdAt: createdAt(),
}, t => [index('attachment_comments_attachment_idx').on(t.attachmentId, t.id)])

export const objectFollows = sqliteTable('object_follows', {
  objectId: integer('object_id').notNull().references(() => objects.id, { onDelete: 'cascade' }),
  userId: integer('user_id').notNull().references(() => users.id),
  createdAt: createdAt(),
}, t => [uniqueIndex('object_follows_unique').on(t.objectId, t.userId), index('object_follows_user_idx').on(t.userId)])

/** Which record mails a member gets; no row = a mail for each proposal, decisions and comments on. */
export const mailPreferences = sqliteTable('mail_preferences', {
  userId: integer('user_id').primaryKey().references(() => users.id),
  /** Proposals (reviewers and admins): a mail for each proposed value, one daily digest, or none. */
  proposalMail: text('proposal_mail').$type<ProposalMailMode>().notNull().default('each'),
  /** When this member's last proposal digest was sent; the next one lists proposals made since. */
  digestSentAt: integer('digest_sent_at', { mode: 'timestamp_ms' }),
  decisions: integer('decisions', { mode: 'boolean' }).notNull().default(true),
  comments: integer('comments', { mode: 'boolean' }).notNull().default(true),
  updatedAt: integer('updated_at', { mode: 'timestamp_ms' }).notNull().default(sql`(unixepoch('subsec') * 1000)`),
})

export type ObjectRecord = typeof objects.$inferSelect
export type Attachment = typeof attachments.$inferSelect
export type AttachmentComment = typeof attachmentComments.$inferSelect
