import { Queue, QueueEvents } from 'bullmq'
import type { TaskName, TaskPayload, TaskResult } from '../workers/tasks'
import { fromWire, toWire } from '../workers/wire'
import { TaskCancelled, errorFromTask, useWorkerPool, type PoolRunOptions } from './worker-pool'
import { JOB_QUEUE, TASK_QUEUE, redisConnection, taskPriority } from './task-queue'
import { useConfig } from './config'

/**
 * Runs one task of the worker protocol: on the app's own worker threads (embedded engine, the
 * default), or, with REDIS_URL set, on whichever `npm run worker` process takes it from the
 * BullMQ task queue (the app then runs no worker threads).
 */
export function runWorkerTask<K extends TaskName>(task: K, payload: TaskPayload<K>, opts: PoolRunOptions = {}): Promise<TaskResult<K>> {
  const url = useConfig().redisUrl
  return url ? runOnRedis(url, task, payload, opts) : useWorkerPool().run(task, payload, opts)
}

/** True when tasks go through Redis to worker processes. */
export function distributed(): boolean {
  return !!useConfig().redisUrl
}

let redis: { tasks: Queue, events: QueueEvents, jobs: Queue, progress: Map<string, PoolRunOptions>, ready: Promise<unknown> } | undefined
const turns = new Map<string, number>()

/** The BullMQ queues of this app process (made on first use). */
export function useRedisQueues(url = useConfig().redisUrl!) {
  if (!redis) {
    const connection = redisConnection(url)
    const events = new QueueEvents(TASK_QUEUE, { connection })
    const progress = new Map<string, PoolRunOptions>()
    events.on('active', ({ jobId }) => {
      const o = progress.get(jobId)
      o?.onStart?.()
      if (o) o.onStart = undefined
    })
    events.on('progress', ({ jobId, data }) => {
      const p = data as { fraction?: number, stage?: string }
      progress.get(jobId)?.onProgress?.(p.fraction ?? 0, p.stage ?? '')
    })
    redis = { tasks: new Queue(TASK_QUEUE, { connection }), jobs: new Queue(JOB_QUEUE, { connection }), events, progress, ready: events.waitUntilReady() }
  }
  return redis
}

async function runOnRedis<K extends TaskName>(url: string, task: K, payload: TaskPayload<K>, opts: PoolRunOptions): Promise<TaskResult<K>> {
  if (opts.signal?.aborted) throw new TaskCancelled()
  const q = useRedisQueues(url)
  await q.ready
  const lane = opts.lane ?? ''
  const turn = opts.interactive || opts.lane === undefined ? 0 : (turns.get(lane) ?? 0)
  if (opts.lane !== undefined && !opts.interactive) turns.set(lane, turn + 1)
  const job = await q.tasks.add(task, toWire({ lane: opts.lane ?? null, interactive: !!opts.interactive || opts.lane === undefined, payload }), {
    priority: taskPriority(!!opts.interactive || opts.lane === undefined, turn),
    removeOnComplete: { age: 600 },
    removeOnFail: { age: 24 * 3600 },
  })
  q.progress.set(job.id!, { ...opts })
  const onAbort = () => void job.remove().catch(() => undefined)
  opts.signal?.addEventListener('abort', onAbort, { once: true })
  try {
    const finished = job.waitUntilFinished(q.events)
    const cancelled = new Promise<never>((_, reject) => {
      if (opts.signal) opts.signal.addEventListener('abort', () => reject(new TaskCancelled()), { once: true })
    })
    const result = await Promise.race([finished, cancelled])
    return fromWire(result) as TaskResult<K>
  }
  catch (error) {
    if (error instanceof TaskCancelled) throw error
    // BullMQ gives the worker's error message; the worker sends a TaskError as JSON in it.
    const message = (error as Error).message
    try {
      throw errorFromTask(JSON.parse(message))
    }
    catch (parsed) {
      if (parsed instanceof SyntaxError) throw new Error(message)
      throw parsed
    }
  }
  finally {
    opts.signal?.removeEventListener('abort', onAbort)
    q.progress.delete(job.id!)
    if (opts.lane !== undefined && opts.signal?.aborted) turns.delete(lane)
  }
}

/** Forgets a finished job's turn counter. */
export function forgetLane(lane: string) {
  turns.delete(lane)
}
