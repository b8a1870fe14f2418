import { setMaxListeners } from 'node:events'
import { existsSync } from 'node:fs'
import { availableParallelism } from 'node:os'
import { join, resolve } from 'node:path'
import { Worker } from 'node:worker_threads'
import { GeometryError } from '#shared/geometry'

type Progress = (fraction: number, stage: string) => void

interface Task {
  id: number
  task: string
  payload: unknown
  transfer: ArrayBuffer[]
  priority: number
  onProgress?: Progress
  resolve: (v: unknown) => void
  reject: (e: unknown) => void
  signal?: AbortSignal
}

interface Slot { worker: Worker, busy?: Task }

/** Thrown for a task that was cancelled through its AbortSignal. */
export class TaskCancelled extends Error {
  constructor() {
    super('cancelled')
    this.name = 'TaskCancelled'
  }
}

function workerScript(): string {
  const candidates = [
    process.env.ISTHMUS_WORKERS_DIR && join(process.env.ISTHMUS_WORKERS_DIR, 'lobe-worker.mjs'),
    join(serverEntryDir(), 'workers', 'lobe-worker.mjs'),
    resolve('.nuxt/workers/lobe-worker.mjs'),
  ].filter((p): p is string => !!p)
  const found = candidates.find(p => existsSync(p))
  if (!found) throw new Error(`worker bundle not found (looked in ${candidates.join(', ')})`)
  return found
}

/**
 * A small pool of worker threads (one per core, at most ISTHMUS_WORKERS) for mesh analysis, surface
 * fields and contact studies. Higher-priority tasks (uploads waiting on an answer) start before
 * queued background chunks; cancelling a running task ends its worker and starts a fresh one.
 */
class WorkerPool {
  private slots: Slot[] = []
  private queue: Task[] = []
  private nextId = 1
  private readonly size = Math.max(1, Math.min(Number(process.env.ISTHMUS_WORKERS) || availableParallelism(), 8))

  run<T>(task: string, payload: unknown, opts: { transfer?: ArrayBuffer[], priority?: number, onProgress?: Progress, signal?: AbortSignal } = {}): Promise<T> {
    return new Promise<T>((resolve, reject) => {
      if (opts.signal?.aborted) return reject(new TaskCancelled())
      const onAbort = () => this.cancel(t)
      // One job's signal is shared by many chunk tasks: each listener goes when its task settles.
      const settle = () => opts.signal?.removeEventListener('abort', onAbort)
      const t: Task = {
        id: this.nextId++, task, payload, transfer: opts.transfer ?? [], priority: opts.priority ?? 0, onProgress: opts.onProgress, signal: opts.signal,
        resolve: (v) => {
          settle()
          resolve(v as T)
        },
        reject: (e) => {
          settle()
          reject(e)
        },
      }
      if (opts.signal) {
        setMaxListeners(0, opts.signal)
        opts.signal.addEventListener('abort', onAbort, { once: true })
      }
      this.queue.push(t)
      this.queue.sort((a, b) => b.priority - a.priority || a.id - b.id)
      this.pump()
    })
  }

  private spawn(): Slot {
    const worker = new Worker(workerScript())
    const slot: Slot = { worker }
    worker.on('message', (msg: { id: number, progress?: number, stage?: string, result?: unknown, error?: { name: string, code?: string, message: string, issues?: { path: string, message: string }[] } }) => {
      const t = slot.busy
      if (!t || t.id !== msg.id) return
      if (msg.progress !== undefined) {
        t.onProgress?.(msg.progress, msg.stage ?? '')
        return
      }
      slot.busy = undefined
      if (msg.error) t.reject(msg.error.name === 'GeometryError' ? new GeometryError(msg.error.code ?? 'invalid-mesh', msg.error.message, msg.error.issues ?? []) : new Error(msg.error.message))
      else t.resolve(msg.result)
      this.pump()
    })
    worker.on('error', (error) => {
      const t = slot.busy
      slot.busy = undefined
      this.slots = this.slots.filter(s => s !== slot)
      t?.reject(error)
      this.pump()
    })
    worker.on('exit', () => {
      this.slots = this.slots.filter(s => s !== slot)
    })
    worker.unref()
    this.slots.push(slot)
    return slot
  }

  private pump() {
    while (this.queue.length) {
      let slot = this.slots.find(s => !s.busy)
      if (!slot && this.slots.length < this.size) slot = this.spawn()
      if (!slot) return
      const t = this.queue.shift()!
      slot.busy = t
      slot.worker.postMessage({ id: t.id, task: t.task, payload: t.payload }, t.transfer)
    }
  }

  private cancel(t: Task) {
    const queued = this.queue.indexOf(t)
    if (queued >= 0) {
      this.queue.splice(queued, 1)
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

  /** Starts every worker now (each warms its hot loops), so the first request does not wait for that. */
  prestart() {
    while (this.slots.length < this.size) this.spawn()
  }

  async close() {
    await Promise.all(this.slots.map(s => s.worker.terminate()))
    this.slots = []
  }
}

let pool: WorkerPool | undefined
export function useWorkerPool(): WorkerPool {
  pool ??= new WorkerPool()
  return pool
}
