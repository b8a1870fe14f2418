/** A readable message from a failed $fetch (server messages are written for people). */
export function errorMessage(error: unknown): string {
  const e = error as { data?: { message?: string, statusMessage?: string }, message?: string, statusMessage?: string }
  return e?.data?.message || e?.data?.statusMessage || e?.statusMessage || e?.message || 'Something went wrong'
}

/** Field → message map from a 422 answer's `data.data.issues`. */
export function fieldIssues(error: unknown): Record<string, string> {
  const issues = (error as { data?: { data?: { issues?: { path: string, message: string }[] } } })?.data?.data?.issues ?? []
  return Object.fromEntries(issues.map(i => [i.path, i.message]))
}

export function formatDate(value: string | number | Date | null | undefined): string {
  if (value === null || value === undefined) return '—'
  const d = new Date(value)
  return Number.isNaN(d.getTime()) ? '—' : d.toISOString().replace('T', ' ').slice(0, 16) + ' UTC'
}
