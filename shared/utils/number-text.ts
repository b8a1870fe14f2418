/**
 * Numbers as people read them, for pages and mails alike: `digits` significant digits, powers of
 * ten written ×10ⁿ outside [10⁻³, 10⁶). Display only: exports keep full precision.
 */
export function significantText(value: number, digits: number): string {
  if (value === 0) return '0'
  const a = Math.abs(value)
  if (a >= 1e-3 && a < 1e6) return Number(value.toPrecision(digits)).toString()
  const [m, e] = value.toExponential(digits - 1).split('e')
  return `${Number(m)}×10${superscriptText(Number(e))}`
}

/** An integer in superscript digits (e.g. −12 → ⁻¹²). */
export function superscriptText(n: number): string {
  const map: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' }
  return String(n).split('').map(c => map[c] ?? c).join('')
}
