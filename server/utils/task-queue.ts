import type { ConnectionOptions } from 'bullmq'
import { useConfig } from './config'

/**
 * Names and settings shared by the app and `npm run worker` processes when REDIS_URL is set.
 * Explicit imports only: the worker-process bundle imports this file outside Nitro.
 */
export const TASK_QUEUE = 'isthmus-tasks'
export const JOB_QUEUE = 'isthmus-jobs'

/** BullMQ connection options from a redis:// URL (BullMQ makes its own ioredis clients). */
export function redisConnection(url: string): ConnectionOptions {
  const u = new URL(url)
  return {
    host: u.hostname,
    port: Number(u.port || 6379),
    ...(u.username ? { username: decodeURIComponent(u.username) } : {}),
    ...(u.password ? { password: decodeURIComponent(u.password) } : {}),
    ...(u.pathname.length > 1 ? { db: Number(u.pathname.slice(1)) } : {}),
    ...(u.protocol === 'rediss:' ? { tls: {} } : {}),
    maxRetriesPerRequest: null,
  }
}

/**
 * How long a worker holds a task without renewing its lock before another worker takes it over
 * (a worker process killed mid-task), ms. ISTHMUS_TASK_LOCK_SECONDS, default 15.
 */
export function taskLockMs(): number {
  return useConfig().taskLockMs
}

/** BullMQ priority of a task: 1 for interactive work; a job's k-th task gets 100 + k, so jobs take turns. */
export function taskPriority(interactive: boolean, turn: number): number {
  return interactive ? 1 : Math.min(2_000_000, 100 + turn)
}
