/**
 * `npm run worker`: a worker process for the distributed engine. Takes tasks of the worker protocol
 * (tasks.ts) from the BullMQ task queue on REDIS_URL and runs them on its own worker threads (one
 * per core, or ISTHMUS_WORKERS), reading and writing meshes through the mesh store (UPLOADS_DIR on
 * a shared folder, or S3_ENDPOINT/S3_BUCKET). It needs no database. Run as many as you like, on any
 * machine that reaches Redis and the mesh store; a task whose worker dies is taken over by another
 * once its lock lapses (ISTHMUS_TASK_LOCK_SECONDS).
 * Built with esbuild into `<server>/workers/task-process.mjs` (see nuxt.config.ts).
 */
import { Worker } from 'bullmq'
import { taskError } from './task-thread-errors'
import type { TaskName } from './tasks'
import { fromWire, toWire } from './wire'
import { WorkerPool } from '../utils/worker-pool'
import { TASK_QUEUE, redisConnection, taskLockMs } from '../utils/task-queue'
import { useMeshStore } from '../utils/mesh-store'
import { useConfig } from '../utils/config'

const url = useConfig().redisUrl
if (!url) {
  console.error('[isthmus worker] REDIS_URL is not set: a worker process takes its tasks from Redis (redis://host:port)')
  process.exit(1)
}

const pool = new WorkerPool()
pool.prestart()
await useMeshStore()

const lockDuration = taskLockMs()
const worker = new Worker(TASK_QUEUE, async (job) => {
  const { lane, interactive, payload } = fromWire(job.data) as { lane: string | null, interactive: boolean, payload: unknown }
  console.info(`[isthmus worker] task ${job.name} #${job.id} started${lane ? ` (job ${lane})` : ''}`)
  let last = 0
  try {
    const result = await pool.run(job.name as TaskName, payload as never, {
      interactive, lane: lane ?? undefined,
      onProgress: (fraction, stage) => {
        const now = Date.now()
        if (now - last < 200 && fraction < 1) return
        last = now
        void job.updateProgress({ fraction, stage }).catch(() => undefined)
      },
    })
    return toWire(result)
  }
  catch (error) {
    // The app turns this back into the same error (a GeometryError keeps its code and issues).
    throw new Error(JSON.stringify(taskError(error)))
  }
}, {
  connection: redisConnection(url),
  concurrency: pool.size,
  lockDuration,
  stalledInterval: Math.max(1000, Math.round(lockDuration / 3)),
  maxStalledCount: 2,
})
worker.on('error', error => console.error('[isthmus worker]', error.message))
await worker.waitUntilReady()
console.info(`[isthmus worker] ${pool.size} thread${pool.size === 1 ? '' : 's'} taking tasks from ${TASK_QUEUE} (pid ${process.pid}, meshes in ${(await useMeshStore()).kind === 's3' ? 'the object store' : 'the folder UPLOADS_DIR'})`)

async function stop() {
  await worker.close()
  await pool.close()
  process.exit(0)
}
process.on('SIGTERM', () => void stop())
process.on('SIGINT', () => void stop())
