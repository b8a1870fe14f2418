import { setMaxListeners } from 'node:events'
import { existsSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { Worker } from 'node:worker_threads'
import { GeometryError } from '#shared/geometry'
import type { TaskError, TaskName, TaskPayload, TaskProgress, TaskResult } from '../workers/tasks'
import { serverEntryDir, useConfig } from './config'

/** Thrown for a task that was cancelled through its AbortSignal. */
export class TaskCancelled extends Error {
  constructor() {
    super('cancelled')
    this.name = 'TaskCancelled'
  }
}

/** Thrown when a worker thread ended while running a task, on every try. */
export class WorkerLost extends Error {
  constructor(task: string, code: number, tries: number) {
    super(`the worker thread running task '${task}' exited (code ${code}) ${tries} time${tries === 1 ? '' : 's'}; giving up on it`)
    this.name = 'WorkerLost'
  }
}

/** A task's error as it came over the wire, back as an Error (a GeometryError keeps its code and issues). */
export function errorFromTask(e: TaskError): Error {
  if (e.name === 'GeometryError') return new GeometryError((e.code ?? 'invalid-mesh') as ConstructorParameters<typeof GeometryError>[0], e.message, e.issues ?? [])
  const error = new Error(e.message)
  error.name = e.name
  return error
}

export interface PoolRunOptions {
  /**
   * Work a request is waiting on (an upload's answer, a display mesh, a split): runs before any
   * job's task. `priority` orders interactive tasks among themselves (higher first).
   */
  interactive?: boolean
  priority?: number
  /** The job the task belongs to: jobs take turns (round-robin), one task at a time each. */
  lane?: string
  onProgress?: TaskProgress
  /** Called once when a worker takes the task. */
  onStart?: () => void
  signal?: AbortSignal
}

interface Task {
  id: number
  task: TaskName
  payload: unknown
  opts: PoolRunOptions
  tries: number
  resolve: (v: unknown) => void
  reject: (e: unknown) => void
}

interface Slot { worker: Worker, busy?: Task }

/** Times a task is tried when its worker thread dies under it. */
const TASK_TRIES = 2

function workerScript(): string {
  const candidates = [
    useConfig().workersDir && join(useConfig().workersDir!, 'task-thread.mjs'),
    join(serverEntryDir(), 'workers', 'task-thread.mjs'),
    join(serverEntryDir(), 'task-thread.mjs'),
    resolve('.nuxt/workers/task-thread.mjs'),
  ].filter((p): p is string => !!p)
  const found = candidates.find(p => existsSync(p))
  if (!found) throw new Error(`worker bundle not found (looked in ${candidates.join(', ')})`)
  return found
}

/** Worker threads per process: ISTHMUS_WORKERS, else one per core (at most 8). */
export function workerThreadCount(): number {
  return useConfig().workers
}

/**
 * A pool of worker threads for the heavy tasks of the worker protocol (server/workers/tasks.ts).
 * Scheduling: interactive tasks first (by priority); then the lanes (one per job) take turns, one
 * task each, so a big job's hundreds of chunks cannot hold every worker: a new job gets a worker as
 * soon as one task ends. A thread that dies under a task (crash, out of memory, exit without an
 * error event) is replaced and the task tried again once; then it fails with WorkerLost.
 * Cancelling a running task ends its worker and starts a fresh one.
 */
export class WorkerPool {
  private slots: Slot[] = []
  private interactive: Task[] = []
  private lanes = new Map<string, Task[]>()
  private turn = 0
  private nextId = 1
  private closed = false

  constructor(readonly size = workerThreadCount()) {}

  run<K extends TaskName>(task: K, payload: TaskPayload<K>, opts: PoolRunOptions = {}): Promise<TaskResult<K>> {
    return new Promise<TaskResult<K>>((resolve, reject) => {
      const signal = opts.signal
      if (signal?.aborted) return reject(new TaskCancelled())
      const onAbort = () => this.cancel(t)
      // One job's signal is shared by many chunk tasks: each listener goes when its task settles.
      const settle = () => signal?.removeEventListener('abort', onAbort)
      const t: Task = {
        id: this.nextId++, task, payload, opts, tries: 0,
        resolve: (v) => {
          settle()
          resolve(v as TaskResult<K>)
        },
        reject: (e) => {
          settle()
          reject(e)
        },
      }
      if (signal) {
        setMaxListeners(0, signal)
        signal.addEventListener('abort', onAbort, { once: true })
      }
      this.enqueue(t)
      this.pump()
    })
  }

  /** Tasks waiting for a worker, interactive and per lane. */
  stats() {
    return { threads: this.size, busy: this.slots.filter(s => s.busy).length, interactive: this.interactive.length, lanes: [...this.lanes].map(([lane, q]) => ({ lane, queued: q.length })) }
  }

  private enqueue(t: Task, front = false) {
    if (t.opts.interactive || t.opts.lane === undefined) {
      this.interactive.push(t)
      this.interactive.sort((a, b) => (b.opts.priority ?? 0) - (a.opts.priority ?? 0) || a.id - b.id)
      return
    }
    let q = this.lanes.get(t.opts.lane)
    if (!q) this.lanes.set(t.opts.lane, q = [])
    if (front) q.unshift(t)
    else q.push(t)
  }

  /** The next task: interactive first, then the next lane in turn. */
  private next(): Task | undefined {
    if (this.interactive.length) return this.interactive.shift()
    const names = [...this.lanes.keys()]
    if (!names.length) return undefined
    const name = names[this.turn % names.length]!
    const q = this.lanes.get(name)!
    const t = q.shift()
    if (!q.length) this.lanes.delete(name)
    else this.turn++
    if (this.turn >= names.length) this.turn = 0
    return t
  }

  private spawn(): Slot {
    const worker = new Worker(workerScript())
    const slot: Slot = { worker }
    worker.on('message', (msg: { id: number, progress?: number, stage?: string, result?: unknown, error?: TaskError }) => {
      const t = slot.busy
      if (!t || t.id !== msg.id) return
      if (msg.progress !== undefined) {
        t.opts.onProgress?.(msg.progress, msg.stage ?? '')
        return
      }
      slot.busy = undefined
      if (msg.error) t.reject(errorFromTask(msg.error))
      else t.resolve(msg.result)
      this.pump()
    })
    // An uncaught error in the thread: 'error' then 'exit'. A thread killed or ended without an
    // error (process.exit in a library, out of memory): 'exit' only. Either way the task is not lost.
    const lost = (code: number, error?: Error) => {
      const t = slot.busy
      slot.busy = undefined
      this.slots = this.slots.filter(s => s !== slot)
      if (t) {
        if (t.tries < TASK_TRIES && !t.opts.signal?.aborted) this.enqueue(t, true)
        else t.reject(error ?? new WorkerLost(t.task, code, t.tries))
      }
      this.pump()
    }
    worker.on('error', error => lost(1, error))
    worker.on('exit', code => lost(code))
    worker.unref()
    this.slots.push(slot)
    return slot
  }

  private pump() {
    while (!this.closed) {
      let slot = this.slots.find(s => !s.busy)
      if (!slot && this.slots.length < this.size) slot = this.spawn()
      if (!slot) return
      const t = this.next()
      if (!t) return
      slot.busy = t
      t.tries++
      if (t.tries === 1) t.opts.onStart?.()
      slot.worker.postMessage({ id: t.id, task: t.task, payload: t.payload })
    }
  }

  private cancel(t: Task) {
    const i = this.interactive.indexOf(t)
    if (i >= 0) this.interactive.splice(i, 1)
    const q = t.opts.lane !== undefined ? this.lanes.get(t.opts.lane) : undefined
    const j = q ? q.indexOf(t) : -1
    if (q && j >= 0) {
      q.splice(j, 1)
      if (!q.length) this.lanes.delete(t.opts.lane!)
    }
    if (i >= 0 || j >= 0) {
      t.reject(new TaskCancelled())
      return
    }
    const slot = this.slots.find(s => s.busy === t)
    if (slot) {
      slot.busy = undefined
      this.slots = this.slots.filter(s => s !== slot)
      void slot.worker.terminate()
      t.reject(new TaskCancelled())
      this.pump()
    }
  }

  /** The worker thread running a task now (tests end it to check that the task survives). */
  threadIds(): number[] {
    return this.slots.filter(s => s.busy).map(s => s.worker.threadId)
  }

  /** Ends the busy worker threads without warning, as a crash would (for tests). */
  async killBusy() {
    for (const s of this.slots.filter(s => s.busy)) await s.worker.terminate()
  }

  /** Starts every worker now (each warms its hot loops), so the first request does not wait for that. */
  prestart() {
    while (this.slots.length < this.size) this.spawn()
  }

  async close() {
    this.closed = true
    const slots = this.slots
    this.slots = []
    for (const s of slots) s.busy = undefined
    await Promise.all(slots.map(s => s.worker.terminate()))
  }
}

let pool: WorkerPool | undefined
/** The process's embedded pool of worker threads. */
export function useWorkerPool(): WorkerPool {
  pool ??= new WorkerPool()
  return pool
}
