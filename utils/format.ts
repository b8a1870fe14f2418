/** Numbers for tables: 5 significant digits, scientific notation outside [1e-3, 1e6). Full precision stays in exports. */
export function fmt(value: unknown, digits = 5): string {
  if (typeof value !== 'number' || !Number.isFinite(value)) return '—'
  if (value === 0) return '0'
  const a = Math.abs(value)
  if (a >= 1e-3 && a < 1e6) return Number(value.toPrecision(digits)).toString()
  const [m, e] = value.toExponential(digits - 1).split('e')
  return `${Number(m)}×10${superscript(Number(e))}`
}

function superscript(n: number): string {
  const map: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' }
  return String(n).split('').map(c => map[c] ?? c).join('')
}

/** A vector as "(x, y, z)". */
export function fmtVec(v: unknown, digits = 5): string {
  return Array.isArray(v) ? `(${v.map(x => fmt(x, digits)).join(', ')})` : '—'
}

/** { min, max, mean } as "mean (min – max)". */
export function fmtRange(r: unknown, digits = 4): string {
  const x = r as { min?: number, max?: number, mean?: number } | null
  return x && typeof x.mean === 'number' ? `${fmt(x.mean, digits)} (${fmt(x.min, digits)} – ${fmt(x.max, digits)})` : '—'
}

export function fmtValue(v: unknown, digits = 5): string {
  if (typeof v === 'number') return fmt(v, digits)
  if (Array.isArray(v)) return Array.isArray(v[0]) ? v.map(r => fmtVec(r, digits)).join(' ') : fmtVec(v, digits)
  if (v && typeof v === 'object' && 'mean' in v) return fmtRange(v, digits)
  return '—'
}

export function hours(seconds: unknown): string {
  return typeof seconds === 'number' && Number.isFinite(seconds) ? `${fmt(seconds / 3600, 4)} h` : '—'
}
