import { Worker as BullWorker } from 'bullmq'
import { and, asc, desc, eq, inArray, sql } from 'drizzle-orm'
import type { Job, JobStatus } from '../db/schema'
import type { TaskName, TaskPayload, TaskResult, TaskProgress } from '../workers/tasks'
import { JOB_QUEUE, redisConnection, taskLockMs } from './task-queue'
import { TaskCancelled, type PoolRunOptions } from './worker-pool'

/**
 * The job engine: one row per job in `jobs` (kind, owner, inputs hash, algorithm version, state
 * queued → running → done | failed | cancelled, progress, stage, attempts, timestamps), its work
 * split into tasks of the worker protocol run through `runWorkerTask` (embedded threads, or worker
 * processes on Redis). A job stays `queued` until its first task runs. Identical jobs (kind,
 * inputs hash, algorithm version) run once and are shared. Results are written by the job kind
 * with UPDATEs guarded on the job id, so a stale job never overwrites newer state. A job that was
 * running when its process stopped resumes by itself (from its inputs) up to MAX_ATTEMPTS starts.
 */

/** Starts of a job before it is given up as failed (restarts, lost coordinators). */
export const MAX_ATTEMPTS = 3

export interface JobContext {
  db: DB
  job: Job
  signal: AbortSignal
  /** Runs a task in this job's lane (jobs take turns on the workers). */
  task: <K extends TaskName>(task: K, payload: TaskPayload<K>, opts?: { onProgress?: TaskProgress }) => Promise<TaskResult<K>>
  /** Progress 0..1 and stage, written to the row at most every 250 ms (a new stage at once). */
  progress: (fraction: number, stage: string) => void
}

/** A kind of job: how to run it, and what its subjects (lobes, studies) show as it changes state. */
export interface JobKind {
  /** Runs the job; writes its results guarded by job id; returns the summary kept in jobs.result. */
  run: (ctx: JobContext) => Promise<Record<string, unknown> | null>
  /** The job's state changed (running, progress, done, failed, cancelled): mirror it on subjects. */
  mirror?: (db: DB, job: Pick<Job, 'id' | 'status' | 'progress' | 'stage' | 'error'>) => Promise<void>
}

/**
 * Every job kind. To add one: write `export const fooJob: JobKind = { run, mirror }` beside the
 * domain's other server code (its tasks go in server/workers/, see tasks.ts) and list it here.
 */
function jobKinds(): Record<string, JobKind> {
  return { 'surface-field': surfaceFieldJob, 'study': studyJob }
}

const running = new Map<number, AbortController>()

export interface SubmitJob {
  kind: string
  ownerId?: number | null
  inputsHash: string
  algorithmVersion: string
  params?: Record<string, unknown>
  lobeId?: number
  studyId?: number
}

/**
 * Queues a job, or returns the queued or running job with the same kind, inputs hash and algorithm
 * version (`shared: true`), which then serves this caller too.
 */
export async function submitJob(db: DB, spec: SubmitJob): Promise<{ job: Job, shared: boolean }> {
  const same = await db.select().from(schema.jobs).where(and(
    eq(schema.jobs.kind, spec.kind), eq(schema.jobs.inputsHash, spec.inputsHash), eq(schema.jobs.algorithmVersion, spec.algorithmVersion),
    inArray(schema.jobs.status, ['queued', 'running']),
  )).orderBy(desc(schema.jobs.id)).get()
  if (same) return { job: same, shared: true }
  const [job] = await db.insert(schema.jobs).values({
    kind: spec.kind, ownerId: spec.ownerId ?? null, inputsHash: spec.inputsHash, algorithmVersion: spec.algorithmVersion,
    params: spec.params ?? null, lobeId: spec.lobeId ?? null, studyId: spec.studyId ?? null, stage: 'queued: waiting for a free worker',
  }).returning()
  dispatch(db, job!.id)
  return { job: job!, shared: false }
}

/** The latest finished job with these inputs, whose summary result can be reused. */
export function reusableJob(db: DB, kind: string, inputsHash: string, algorithmVersion: string) {
  return db.select().from(schema.jobs).where(and(
    eq(schema.jobs.kind, kind), eq(schema.jobs.inputsHash, inputsHash), eq(schema.jobs.algorithmVersion, algorithmVersion), eq(schema.jobs.status, 'done'),
  )).orderBy(desc(schema.jobs.id)).get()
}

/** Starts a job's coordinator: in this process (embedded), or through the BullMQ job queue (any app process takes it). */
function dispatch(db: DB, id: number) {
  const url = useConfig().redisUrl
  if (url) {
    void useRedisQueues(url).jobs.add('run', { id }, { jobId: `job-${id}`, removeOnComplete: true, removeOnFail: true })
      .catch(error => console.error(`[isthmus] job ${id} could not be queued on Redis:`, error))
  }
  else void drive(db, id)
}

async function mirror(db: DB, kind: JobKind | undefined, id: number) {
  const row = await db.select().from(schema.jobs).where(eq(schema.jobs.id, id)).get()
  if (row) await kind?.mirror?.(db, row).catch(error => console.error(`[isthmus] job ${id}: subjects not updated:`, error))
}

/**
 * Runs one job to its end (done, failed, or cancelled). Checks the row every second so that a
 * cancel from any app process stops it.
 */
async function drive(db: DB, id: number) {
  if (running.has(id)) return
  const job = await db.select().from(schema.jobs).where(eq(schema.jobs.id, id)).get()
  if (!job || !['queued', 'running'].includes(job.status)) return
  const kind = jobKinds()[job.kind]
  if (!kind) {
    await db.update(schema.jobs).set({ status: 'failed', error: `unknown job kind '${job.kind}'`, finishedAt: new Date() }).where(eq(schema.jobs.id, id))
    return
  }
  const ctl = new AbortController()
  running.set(id, ctl)
  const watch = setInterval(() => {
    db.select({ status: schema.jobs.status }).from(schema.jobs).where(eq(schema.jobs.id, id)).get()
      .then((r) => {
        if (!r || r.status === 'cancelled' || r.status === 'failed') ctl.abort()
      }).catch(() => undefined)
  }, 1000)
  watch.unref()
  let started = false
  const markRunning = () => {
    if (started) return
    started = true
    void db.update(schema.jobs).set({ status: 'running', startedAt: new Date(), attempts: sql`${schema.jobs.attempts} + 1`, stage: 'starting' })
      .where(and(eq(schema.jobs.id, id), eq(schema.jobs.status, 'queued')))
      .then(() => mirror(db, kind, id)).catch(() => undefined)
  }
  let last = 0
  let lastStage = ''
  let trailing: ReturnType<typeof setTimeout> | undefined
  let pending: { progress: number, stage: string } | undefined
  const write = (progress: number, stage: string) => {
    last = Date.now()
    lastStage = stage
    db.update(schema.jobs).set({ progress, stage }).where(and(eq(schema.jobs.id, id), eq(schema.jobs.status, 'running')))
      .then(() => kind.mirror?.(db, { id, status: 'running', progress, stage, error: null })).catch(() => undefined)
  }
  const ctx: JobContext = {
    db, job, signal: ctl.signal,
    task: (task, payload, opts = {}) => runWorkerTask(task, payload, { lane: String(id), signal: ctl.signal, onProgress: opts.onProgress, onStart: markRunning } satisfies PoolRunOptions),
    progress: (progress, stage) => {
      const now = Date.now()
      if (stage !== lastStage || now - last >= 250) {
        pending = undefined
        return write(progress, stage)
      }
      pending = { progress, stage }
      trailing ??= setTimeout(() => {
        trailing = undefined
        if (pending) write(pending.progress, pending.stage)
        pending = undefined
      }, 250 - (now - last))
    },
  }
  try {
    const result = await kind.run(ctx)
    clearTimeout(trailing)
    await db.update(schema.jobs).set({ status: 'done', progress: 1, stage: 'done', result, finishedAt: new Date() })
      .where(and(eq(schema.jobs.id, id), inArray(schema.jobs.status, ['queued', 'running'])))
  }
  catch (error) {
    clearTimeout(trailing)
    const cancelled = error instanceof TaskCancelled || ctl.signal.aborted
    if (!cancelled) console.error(`[isthmus] ${job.kind} job ${id} failed:`, error)
    await db.update(schema.jobs).set({ status: cancelled ? 'cancelled' : 'failed', error: cancelled ? 'cancelled' : (error as Error).message, finishedAt: new Date() })
      .where(and(eq(schema.jobs.id, id), inArray(schema.jobs.status, ['queued', 'running']))).catch(() => undefined)
  }
  finally {
    clearInterval(watch)
    running.delete(id)
    forgetLane(String(id))
    await mirror(db, kind, id)
  }
}

/** Cancels a queued or running job; true when there was something to cancel. */
export async function cancelJob(db: DB, id: number, reason = 'cancelled'): Promise<boolean> {
  const [row] = await db.update(schema.jobs).set({ status: 'cancelled', error: reason, finishedAt: new Date() })
    .where(and(eq(schema.jobs.id, id), inArray(schema.jobs.status, ['queued', 'running']))).returning()
  running.get(id)?.abort()
  if (row) await mirror(db, jobKinds()[row.kind], id)
  return !!row
}

/**
 * After a restart: every job still queued or running resumes from its inputs, unless it already
 * started MAX_ATTEMPTS times (then it fails with a clear error). With Redis, jobs still held by
 * another live app process are left to it (BullMQ keeps one coordinator per job).
 */
export async function resumeJobs(db: DB) {
  const stale = await db.select().from(schema.jobs).where(inArray(schema.jobs.status, ['queued', 'running'])).orderBy(asc(schema.jobs.id))
  for (const job of stale) {
    if (job.attempts >= MAX_ATTEMPTS) {
      await db.update(schema.jobs).set({ status: 'failed', error: `stopped ${job.attempts} times before finishing (server restarts or lost workers); not tried again`, finishedAt: new Date() })
        .where(eq(schema.jobs.id, job.id))
      await mirror(db, jobKinds()[job.kind], job.id)
      continue
    }
    if (job.status === 'running') {
      await db.update(schema.jobs).set({ status: 'queued', stage: 'queued: resuming after a restart', progress: 0 }).where(and(eq(schema.jobs.id, job.id), eq(schema.jobs.status, 'running')))
      await mirror(db, jobKinds()[job.kind], job.id)
    }
    dispatch(db, job.id)
  }
}

let coordinator: BullWorker | undefined

/** With Redis: this app process takes job coordinators from the job queue (many app processes may). */
export function startJobCoordinator(db: DB) {
  const url = useConfig().redisUrl
  if (!url || coordinator) return
  const lockDuration = taskLockMs()
  coordinator = new BullWorker(JOB_QUEUE, async (j) => {
    await drive(db, Number((j.data as { id: number }).id))
  }, { connection: redisConnection(url), concurrency: 64, lockDuration, stalledInterval: Math.max(1000, Math.round(lockDuration / 3)), maxStalledCount: MAX_ATTEMPTS })
  coordinator.on('error', error => console.error('[isthmus] job queue:', error.message))
}

/** Queue positions (1 = next) of the jobs waiting for their first task, oldest first. */
export async function queuePositions(db: DB): Promise<Map<number, number>> {
  const rows = await db.select({ id: schema.jobs.id }).from(schema.jobs).where(eq(schema.jobs.status, 'queued')).orderBy(asc(schema.jobs.id))
  return new Map(rows.map((r, i) => [r.id, i + 1]))
}

/** The API's view of a job (lobe and study pages, GET /api/jobs). */
export function jobView(job: Job, position?: number) {
  return {
    id: job.id,
    kind: job.kind,
    status: job.status as JobStatus,
    progress: job.progress,
    stage: job.stage,
    error: job.error,
    /** 1 = next to get a worker; null unless queued. */
    queuePosition: job.status === 'queued' ? (position ?? null) : null,
    attempts: job.attempts,
    createdAt: job.createdAt,
    startedAt: job.startedAt,
    finishedAt: job.finishedAt,
  }
}

/** Jobs for the admin list: running and queued first, then the latest finished. */
export async function listJobs(db: DB, opts: { limit: number, active: boolean }) {
  const where = opts.active ? inArray(schema.jobs.status, ['queued', 'running']) : undefined
  const rows = await db.select({ job: schema.jobs, ownerName: schema.users.name }).from(schema.jobs)
    .leftJoin(schema.users, eq(schema.users.id, schema.jobs.ownerId))
    .where(where)
    .orderBy(sql`case ${schema.jobs.status} when 'running' then 0 when 'queued' then 1 else 2 end`, desc(schema.jobs.id))
    .limit(opts.limit)
  const positions = await queuePositions(db)
  const now = Date.now()
  return rows.map(r => ({
    ...jobView(r.job, positions.get(r.job.id)),
    owner: r.job.ownerId ? { id: r.job.ownerId, name: r.ownerName } : null,
    subject: r.job.studyId ? { type: 'study', id: r.job.studyId } : r.job.lobeId ? { type: 'lobe', id: r.job.lobeId } : null,
    /** Seconds since the job was queued. */
    ageSeconds: Math.max(0, (now - r.job.createdAt.getTime()) / 1000),
  }))
}
