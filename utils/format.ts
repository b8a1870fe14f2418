import { significantText } from '#shared/utils/number-text'
/**
 * Numbers for tables: 5 significant digits, scientific notation outside [1e-3, 1e6). Display only:
 * full precision stays in exports.
 *
 * Round-off: a value whose magnitude is below NOISE × `scale` is shown as 0, because float64 sums
 * leave residues of ~1e-16 of the quantities involved (a unit vector's "−4.996×10⁻¹⁶", a centroid
 * of 10⁻¹⁵ m on a 10 km body) that are not measurements of anything. Vectors use their largest
 * component as the scale (or the caller's scale, if larger); scalars only when a scale is given.
 */
export const NOISE = 1e-12

export function fmt(value: unknown, digits = 5, scale = 0): string {
  if (typeof value !== 'number' || !Number.isFinite(value)) return '—'
  if (value === 0) return '0'
  const a = Math.abs(value)
  if (scale > 0 && a < NOISE * scale) return '0'
  return significantText(value, digits)
}

/** Largest finite magnitude among the numbers of `v` (0 when none). */
function largest(v: unknown[]): number {
  let m = 0
  for (const x of v) if (typeof x === 'number' && Number.isFinite(x)) m = Math.max(m, Math.abs(x))
  return m
}

/** A vector as "(x, y, z)"; components below NOISE × max(largest component, scale) show as 0. */
export function fmtVec(v: unknown, digits = 5, scale = 0): string {
  if (!Array.isArray(v)) return '—'
  const s = Math.max(scale, largest(v))
  return `(${v.map(x => fmt(x, digits, s)).join(', ')})`
}

/** { min, max, mean } as "mean (min – max)"; round-off relative to the largest of the three (or `scale`). */
export function fmtRange(r: unknown, digits = 4, scale = 0): string {
  const x = r as { min?: number, max?: number, mean?: number } | null
  if (!x || typeof x.mean !== 'number') return '—'
  const s = Math.max(scale, largest([x.min, x.max, x.mean]))
  return `${fmt(x.mean, digits, s)} (${fmt(x.min, digits, s)} – ${fmt(x.max, digits, s)})`
}

/**
 * A number, vector, matrix (rows, each row its own vector) or { min, max, mean }. `scale`: the
 * size that decides what counts as round-off (e.g. the lobe's maximum radius for lengths, m).
 */
export function fmtValue(v: unknown, digits = 5, scale = 0): string {
  if (typeof v === 'number') return fmt(v, digits, scale)
  if (Array.isArray(v)) return Array.isArray(v[0]) ? v.map(r => fmtVec(r, digits, scale)).join(' ') : fmtVec(v, digits, scale)
  if (v && typeof v === 'object' && 'mean' in v) return fmtRange(v, digits, scale)
  return '—'
}

export function hours(seconds: unknown): string {
  return typeof seconds === 'number' && Number.isFinite(seconds) ? `${fmt(seconds / 3600, 4)} h` : '—'
}
