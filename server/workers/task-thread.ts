/**
 * Worker-thread entry for heavy mesh work, so the request thread never blocks. Runs the tasks of
 * the worker protocol (tasks.ts) for the app's embedded pool and for `npm run worker` processes.
 * Built with esbuild into `<server>/workers/task-thread.mjs` (see nuxt.config.ts).
 */
import { readlinkSync } from 'node:fs'
import { setPriority } from 'node:os'
import { parentPort } from 'node:worker_threads'
import { warmPipeline } from '#shared/geometry'
import { contactTasks } from './contact-tasks'
import { fieldTasks } from './field-tasks'
import { meshTasks } from './mesh-tasks'
import { useConfig } from '../utils/config'
import { taskError } from './task-thread-errors'
import type { TaskHandlers, TaskName } from './tasks'

const handlers: TaskHandlers = { ...meshTasks, ...fieldTasks, ...contactTasks }

const port = parentPort!

/** Typed arrays in a result are transferred, not copied. */
function transferables(value: unknown, out: ArrayBuffer[] = []): ArrayBuffer[] {
  if (ArrayBuffer.isView(value)) {
    if (value.buffer instanceof ArrayBuffer && !out.includes(value.buffer)) out.push(value.buffer)
  }
  else if (value && typeof value === 'object') {
    for (const v of Object.values(value)) transferables(v, out)
  }
  return out
}

// Heavy work yields to the request thread: on Linux a thread's niceness is its own, so this worker
// lowers its priority (nice 10) and requests keep their latency while studies and fields run.
try {
  const tid = Number(readlinkSync('/proc/thread-self').split('/').pop())
  if (Number.isInteger(tid) && tid > 0) setPriority(tid, useConfig().workerNice)
}
catch {
  // Not Linux, or not allowed: the worker keeps the default priority.
}

// Warm the hot loops once at start (small in-memory spheres), so the first real upload does not
// pay for the JIT's tier-up in the middle of a million-face mesh.
warmPipeline()

port.on('message', async (msg: { id: number, task: TaskName, payload: unknown }) => {
  const progress = (fraction: number, stage: string) => port.postMessage({ id: msg.id, progress: fraction, stage })
  try {
    const run = handlers[msg.task] as ((payload: unknown, progress: (f: number, s: string) => void) => Promise<unknown>) | undefined
    if (!run) throw new Error(`unknown worker task ${msg.task}`)
    const result = await run(msg.payload, progress)
    port.postMessage({ id: msg.id, result }, transferables(result))
  }
  catch (error) {
    port.postMessage({ id: msg.id, error: taskError(error) })
  }
})
