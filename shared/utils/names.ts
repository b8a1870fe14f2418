/**
 * Names that arrive from outside (uploaded file names) are stored in one form: Unicode NFC,
 * without control characters (C0, C1, line/paragraph separators) or bidirectional formatting
 * characters (LRE/RLE/PDF/LRO/RLO, LRI/RLI/FSI/PDI, LRM/RLM/ALM), which could make a name display
 * as something it is not (`cod.exe` shown as `exe.doc`), with surrounding white space trimmed and a
 * length bound in code points.
 */

// eslint-disable-next-line no-control-regex
const UNSAFE = /[\u0000-\u001F\u007F-\u009F\u061C\u200E\u200F\u2028\u2029\u202A-\u202E\u2066-\u2069]/g

/** The longest stored file name, in code points. */
export const MAX_FILE_NAME_LENGTH = 255

/**
 * A file name made safe to store and show: folders dropped, NFC, unsafe characters removed, at most
 * `max` code points (the extension is kept when the stem is cut).
 * @returns the cleaned name, or `''` when nothing is left.
 */
export function normaliseFileName(raw: string, max = MAX_FILE_NAME_LENGTH): string {
  const base = raw.split(/[/\\]/).pop() ?? ''
  // White space (tabs, line breaks included) becomes one space; other unsafe characters go.
  const clean = base.normalize('NFC').replace(/\s+/g, ' ').replace(UNSAFE, '').trim()
  const chars = [...clean]
  if (chars.length <= max) return clean
  const dot = clean.lastIndexOf('.')
  const ext = dot > 0 ? [...clean.slice(dot)] : []
  if (ext.length > 0 && ext.length <= 16) return chars.slice(0, max - ext.length).join('').trimEnd() + ext.join('')
  return chars.slice(0, max).join('').trimEnd()
}
