/**
 * The one CSV cell writer behind every CSV export (RFC 4180 quoting, formula neutralising).
 *
 * Spreadsheets run a cell as a formula when its text starts with `=`, `+`, `-` or `@` (and some
 * when it starts with a tab or carriage return, or the full-width and minus-sign look-alikes), so a
 * display name like `=HYPERLINK(…)` could run in the reader's spreadsheet. Text cells starting with
 * one of those characters get a leading apostrophe (`'`), which spreadsheets show as text, and are
 * quoted; the original text is the cell minus that one apostrophe. Numbers (JavaScript numbers, or
 * text that is exactly a decimal number such as "-1.5e3") are written as they are, so negative
 * values stay numbers. Common practice (OWASP "CSV Injection"), no further source.
 */

/** First characters that make a spreadsheet read a cell as a formula. */
const FORMULA_START = /^[=+\-@\t\r\uFF1D\uFF0B\uFF0D\uFF20\u2212]/
/** Plain decimal number text ("-1.5", "+3e-7"): read as a number, never as a formula. */
const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/

/**
 * One CSV cell. `null`/`undefined` → empty; numbers through `formatNumber` (default: shortest
 * round-trip form, full float64 precision). Quoted when it holds a comma, quote, line break or
 * leading/trailing white space.
 */
export function csvCell(v: string | number | null | undefined, formatNumber: (n: number) => string = String): string {
  if (v === null || v === undefined) return ''
  let s = typeof v === 'number' ? formatNumber(v) : v
  if (typeof v === 'string' && FORMULA_START.test(s) && !DECIMAL.test(s)) s = `'${s}`
  return /[",\r\n]/.test(s) || /^\s|\s$/.test(s) || s.startsWith('\'') ? `"${s.replace(/"/g, '""')}"` : s
}

/** One CSV line (no line ending) from its cells. */
export function csvRow(cells: readonly (string | number | null | undefined)[], formatNumber?: (n: number) => string): string {
  return cells.map(c => csvCell(c, formatNumber)).join(',')
}
