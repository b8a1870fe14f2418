/** Display helpers for record values (pages only; exports keep full precision). */
import { fmt } from './format'

/**
 * A value for reading: 6 significant digits, or every digit when there are at most 7; powers of
 * ten written as on the lobe pages (2.99291×10¹²), never as 2.99291e+12.
 */
export function formatRecordNumber(v: number): string {
  const exact = String(v)
  if (exact.replace(/^-|\.|e.*$/g, '').length <= 7) return exact.includes('e') ? fmt(v, 7) : exact
  return fmt(v, 6)
}

export function formatRecordValue(value: number | number[] | null | undefined): string {
  if (value === null || value === undefined) return '—'
  return Array.isArray(value) ? `[${value.map(formatRecordNumber).join(', ')}]` : formatRecordNumber(value)
}

/** The exact value, for a tooltip or copy. */
export function exactRecordValue(value: number | number[] | null | undefined): string {
  if (value === null || value === undefined) return ''
  return Array.isArray(value) ? `[${value.map(String).join(', ')}]` : String(value)
}

export function formatRecordSpread(spread: Record<string, number | string> | null | undefined): string {
  if (!spread) return ''
  const n = (k: string) => (typeof spread[k] === 'number' ? spread[k] as number : undefined)
  const sd = n('sd') ?? n('std')
  const what = spread.basis === 'surface-range' ? 'surface range' : 'spread'
  const mean = n('mean')
  // A spread has its own centre, which need not be the nominal value beside it.
  if (sd !== undefined && mean !== undefined) return `(${what}: ${formatRecordNumber(mean)} ± ${formatRecordNumber(sd)})`
  if (sd !== undefined) return `± ${formatRecordNumber(sd)} (${what})`
  const lo = n('min') ?? n('low') ?? n('p05') ?? n('p16')
  const hi = n('max') ?? n('high') ?? n('p95') ?? n('p84')
  if (lo !== undefined && hi !== undefined) return `${what} ${formatRecordNumber(lo)} … ${formatRecordNumber(hi)}`
  return ''
}

export const RECORD_STATE_CLASSES: Record<string, string> = {
  proposed: 'bg-regolith-100 text-regolith-800',
  accepted: 'bg-ice-100 text-ice-800',
  rejected: 'bg-red-100 text-red-800',
  superseded: 'bg-basalt-100 text-basalt-600',
}

/** Subject badges: one tint per subject so a value's subject is seen before its number. */
export const RECORD_SUBJECT_CLASSES: Record<string, string> = {
  'lobe-a': 'bg-ice-100 text-ice-900 ring-ice-300',
  'lobe-b': 'bg-regolith-100 text-regolith-900 ring-regolith-300',
  'whole-body': 'bg-basalt-100 text-basalt-900 ring-basalt-300',
  'merged-body': 'bg-basalt-800 text-white ring-basalt-900',
  'lobe-pair': 'bg-white text-basalt-900 ring-basalt-400',
}
