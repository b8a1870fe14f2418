/**
 * The worker protocol: every task a worker thread (or an `npm run worker` process) runs, with its
 * payload and result types. The pool, the task runners and the thread entry all use this one map,
 * so a payload that does not match its task is a type error on both sides.
 *
 * Messages on a thread: `{ id, task, payload }` in; `{ id, progress, stage }`, then
 * `{ id, result }` or `{ id, error }` out (typed arrays in results are transferred, not copied).
 * Files are named by mesh-store keys (server/utils/mesh-store.ts), never by paths, so the same
 * task runs on a thread of the app or on a worker process on another machine.
 *
 * Adding a task kind:
 *  1. write the handler `(payload, progress) => Promise<result>` in the domain file
 *     (mesh-tasks.ts, field-tasks.ts, contact-tasks.ts, or a new `<domain>-tasks.ts`), with its
 *     payload and result interfaces;
 *  2. add `'<name>': { payload: P, result: R }` to TaskMap below;
 *  3. add the handler to `handlers` in task-thread.ts (the type checks it is there);
 *  4. call it from the app with `runWorkerTask('<name>', payload, { lane })` (server/utils/task-runner.ts),
 *     inside a job's `run` for background work (the job id as lane: jobs share workers round-robin),
 *     or `{ interactive: true }` for work a request waits on. Size a task to ~0.1–0.3 s of work:
 *     a new job gets a worker within one task's time. Payloads and results must survive JSON
 *     through Redis: plain data and typed arrays only (server/workers/wire.ts encodes them).
 */
import type { AnalysePayload, AnalyseResult, DisplayPayload, SplitPayload, SplitTaskResult } from './mesh-tasks'
import type { CoefficientSumsPayload, DisplayMapPayload, FieldChecksPayload, FieldFacesPayload, FieldFacesResult } from './field-tasks'
import type { SpreadChunkPayload, SpreadChunkResult, StudyPayload, StudyTaskResult } from './contact-tasks'

export interface TaskMap {
  'analyse': { payload: AnalysePayload, result: AnalyseResult }
  'display': { payload: DisplayPayload, result: { ok: true } }
  'split': { payload: SplitPayload, result: SplitTaskResult }
  'field-faces': { payload: FieldFacesPayload, result: FieldFacesResult }
  'field-checks': { payload: FieldChecksPayload, result: Float64Array }
  'coefficient-sums': { payload: CoefficientSumsPayload, result: Float64Array }
  'field-display-map': { payload: DisplayMapPayload, result: Uint32Array }
  'study': { payload: StudyPayload, result: StudyTaskResult }
  'spread-chunk': { payload: SpreadChunkPayload, result: SpreadChunkResult }
}

export type TaskName = keyof TaskMap
export type TaskPayload<K extends TaskName> = TaskMap[K]['payload']
export type TaskResult<K extends TaskName> = TaskMap[K]['result']
/** Progress of a task: fraction 0..1 and a stage name. */
export type TaskProgress = (fraction: number, stage: string) => void
export type TaskHandlers = { [K in TaskName]: (payload: TaskPayload<K>, progress: TaskProgress) => Promise<TaskResult<K>> }

/** A task's failure as it crosses a thread or Redis: a GeometryError keeps its code and issues. */
export interface TaskError { name: string, code?: string, message: string, issues?: { path: string, message: string }[], stack?: string }
