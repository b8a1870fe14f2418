import { describe, expect, it } from 'vitest'
import { recordCitation, recordCsv, recordCsvCell, recordSpreadText, RECORD_CSV_COLUMNS, type RecordExport, type RecordExportValue } from '../../../shared/utils/records-export'

function value(over: Partial<RecordExportValue>): RecordExportValue {
  return {
    id: 1, quantityKey: 'mass', label: 'Mass', components: null, subject: 'lobe-a', subjectLabel: 'lobe A', value: 1, unit: 'kg', spread: null,
    referenceRadius: null, state: 'accepted', source: { type: 'lobe', id: 4 },
    provenance: { source: 'lobe', lobe: { sourceFileName: 'a, "b".obj', sha256: 'ab'.repeat(32), densityKgM3: 512.5 }, algorithmVersion: 'alg 1' },
    proposedBy: { id: 2, name: 'P' }, proposedAt: '2030-01-01T00:00:00.000Z', reviewedBy: { id: 3, name: 'R' }, reviewedAt: '2030-01-02T00:00:00.000Z', ...over,
  }
}

/** RFC 4180 reader for the checks below. */
function parse(text: string): string[][] {
  const rows: string[][] = []
  let row: string[] = [], cell = '', q = false
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!
    if (q) {
      if (c === '"' && text[i + 1] === '"') { cell += '"'; i++ }
      else if (c === '"') q = false
      else cell += c
    }
    else if (c === '"') q = true
    else if (c === ',') { row.push(cell); cell = '' }
    else if (c === '\n') { row.push(cell.replace(/\r$/, '')); rows.push(row); row = []; cell = '' }
    else cell += c
  }
  return rows
}

describe('record CSV', () => {
  const rec: RecordExport = {
    object: { id: 9, designation: '2041 KD9', name: 'Demo', population: 'other' },
    cautions: ['estimate'],
    currentValues: [
      value({ id: 1, value: 0.1 + 0.2, spread: { basis: 'study-spread', min: 0.25, max: 0.35, std: 0.02 } }),
      value({ id: 2, quantityKey: 'principalMoments', label: 'Principal moments', components: ['A', 'B', 'C'], value: [1 / 3, 2 / 3, 5e-324], unit: 'kg m²' }),
      value({ id: 3, quantityKey: 'J2', value: -Number.MIN_VALUE * 1e10, referenceRadius: 1234.5678901234567, unit: '1' }),
    ],
  }
  const rows = parse(recordCsv(rec))
  const [header, ...body] = rows
  const col = (n: string) => header!.indexOf(n)

  it('writes the header and one row per scalar and per vector component', () => {
    expect(header).toEqual([...RECORD_CSV_COLUMNS])
    expect(body.length).toBe(1 + 3 + 1)
    expect(body.map(r => r[col('component')])).toEqual(['', 'A', 'B', 'C', ''])
  })

  it('round-trips every float64 exactly (0.1 + 0.2, 1/3, the smallest subnormal)', () => {
    const numbers = body.map(r => Number(r[col('value')]))
    expect(numbers).toEqual([0.1 + 0.2, 1 / 3, 2 / 3, 5e-324, -Number.MIN_VALUE * 1e10])
    expect(body[0]![col('value')]).toBe('0.30000000000000004')
    expect(Number(body[4]![col('reference_radius_m')])).toBe(1234.5678901234567)
    expect(body[0]!.slice(col('spread_low'), col('spread_sd') + 1)).toEqual(['0.25', '0.35', '0.02'])
  })

  it('quotes cells with commas and quotes (RFC 4180)', () => {
    expect(recordCsvCell('a, "b"')).toBe('"a, ""b"""')
    expect(recordCsvCell('plain')).toBe('plain')
    expect(body[0]![col('mesh_sha256')]).toBe('ab'.repeat(32))
    expect(body[0]![col('density_kg_m3')]).toBe('512.5')
  })

  it('writes a citation block with exact values, units, provenance and cautions', () => {
    const text = recordCitation(rec, { link: 'http://x/objects/9', exportedAt: new Date('2031-05-06T07:08:09Z'), softwareVersion: '0.1.0' })
    expect(text).toContain('Cite as: Isthmus team record "2041 KD9", http://x/objects/9, retrieved 2031-05-06T07:08:09.000Z; Isthmus 0.1.0.')
    expect(text).toContain('Mass (mass, lobe A) = 0.30000000000000004 kg ± 0.02 (study spread, 1σ)')
    expect(text).toContain('reference radius 1234.5678901234567 m')
    expect(text).toContain('density 512.5 kg m⁻³')
    expect(text.trimEnd().endsWith('- estimate')).toBe(true)
  })

  it('describes spreads by what they hold', () => {
    expect(recordSpreadText({ basis: 'surface-range', min: 1, max: 2 })).toBe('[1, 2] (range over the surface)')
    expect(recordSpreadText(null)).toBe('')
    // A study spread names its own centre, which need not be the nominal value it is printed beside.
    expect(recordSpreadText({ basis: 'study-spread', mean: 4.67, std: 0.6, median: 4.68, min: 3, max: 6 })).toBe('(study spread: mean 4.67 ± 0.6 1σ, median 4.68)')
  })
})
