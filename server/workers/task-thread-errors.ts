import { GeometryError } from '#shared/geometry'
import type { TaskError } from './tasks'

/** A task's failure as it crosses a thread or Redis: a GeometryError keeps its code and issues. */
export function taskError(error: unknown): TaskError {
  const e = error as Error
  return error instanceof GeometryError
    ? { name: 'GeometryError', code: error.code, message: error.message, issues: error.issues }
    : { name: e?.name ?? 'Error', message: e?.message ?? String(error), stack: e?.stack }
}
