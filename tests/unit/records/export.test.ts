import { describe, expect, it } from 'vitest'
import { recordCitation, recordCsv, recordCsvCell, recordDisplay, recordSpreadNote, recordSpreadOffset, recordSpreadText, RECORD_CSV_COLUMNS, type RecordExport, type RecordExportValue } from '#shared/utils/records-export'

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
    expect(text).toContain('Mass (mass, lobe A) = 0.30000000000000004 kg (study spread over sampled inputs: σ 0.02, range [0.25, 0.35])')
    expect(text).toContain('lobe spin: not rotating')
    expect(text).toContain('reference radius 1234.5678901234567 m')
    expect(text).toContain('density 512.5 kg m⁻³')
    expect(text.trimEnd().endsWith('- estimate')).toBe(true)
  })

  it('describes spreads by what they hold', () => {
    expect(recordSpreadText({ basis: 'surface-range', min: 1, max: 2 })).toBe('[1, 2] (range over the surface)')
    expect(recordSpreadText(null)).toBe('')
    // A study spread names its own centre, which need not be the nominal value it is printed beside.
    expect(recordSpreadText({ basis: 'study-spread', mean: 4.67, std: 0.6, median: 4.68, min: 3, max: 6, n: 40 }))
      .toBe('(study spread over sampled inputs: median 4.68, mean 4.67, σ 0.6, range [3, 6], n 40)')
  })
})

describe('spread centre against the nominal value', () => {
  // A spread drawn over a density range 300–1200 kg m⁻³ while the nominal run used 500: its centre sits above the nominal.
  const offCentre = { basis: 'study-spread', min: 3.07, median: 4.07259, max: 5.22, mean: 4.073, std: 0.517743, n: 40 }

  it('notes a spread whose median is away from the value, with the offset in units of its σ', () => {
    const off = recordSpreadOffset(3.32688, offCentre)!
    expect(off.centre).toBe(4.07259)
    expect(off.by).toBeCloseTo(4.07259 - 3.32688, 12)
    expect(off.sigmas!).toBeCloseTo((4.07259 - 3.32688) / 0.517743, 12)
    const note = recordSpreadNote(3.32688, offCentre, 'm s⁻¹')
    expect(note).toContain('not centred on the nominal value')
    expect(note).toContain('centre 4.07259 m s⁻¹')
    expect(note).toContain('above it, 1.44σ')
    expect(recordSpreadNote(5, offCentre, 'm s⁻¹')).toContain('below it')
  })

  it('treats an offset within twice the standard error of the median as centred', () => {
    // Standard error of a sample median from a normal parent: sqrt(π/2)·σ/√n (Kendall & Stuart, vol. 1 [mem]).
    const sigma = 2, n = 25
    const se = Math.sqrt(Math.PI / 2) * sigma / Math.sqrt(n)
    const spread = (median: number) => ({ basis: 'study-spread', median, std: sigma, n })
    expect(recordSpreadOffset(10, spread(10 + 1.99 * se))).toBeNull()
    expect(recordSpreadOffset(10, spread(10 + 2.01 * se))).not.toBeNull()
    expect(recordSpreadOffset(10, spread(10 - 2.01 * se))!.by).toBeLessThan(0)
    // Without a sample count only the 0.1 σ floor applies.
    expect(recordSpreadOffset(10, { basis: 'study-spread', median: 10 + 0.09 * sigma, std: sigma })).toBeNull()
    expect(recordSpreadOffset(10, { basis: 'study-spread', median: 10 + 0.11 * sigma, std: sigma })).not.toBeNull()
    // Surface ranges and vectors have no centre to compare.
    expect(recordSpreadOffset(1, { basis: 'surface-range', min: 5, max: 6 })).toBeNull()
    expect(recordSpreadOffset([1, 2], offCentre)).toBeNull()
    expect(recordSpreadNote(4.07259, offCentre)).toBe('')
  })

  it('notes a value outside the spread\'s range even when the median is within sampling noise of it', () => {
    // A skewed spread: 12 samples, all above the value, median only 0.5 σ above it, which is within
    // twice the standard error of a median at n = 12 (1.45 σ): "centred", yet the value is below every sample.
    const skewed = { basis: 'study-spread', min: 10.1, median: 11, max: 20, mean: 12.5, std: 2, n: 12 }
    const off = recordSpreadOffset(10, skewed)!
    expect(off.centred).toBe(true)
    expect(off.outside).toBe('below')
    const note = recordSpreadNote(10, skewed, 'm')
    expect(note).not.toContain('not centred')
    expect(note).toContain('The nominal value 10 m lies outside the spread\'s range [10.1, 20] m (below every sample)')
    // Above the range, and off-centre too: both sentences.
    const both = recordSpreadNote(25, skewed, 'm')
    expect(both).toContain('not centred on the nominal value')
    expect(both).toContain('(above every sample)')
    // Inside the range and centred: no note.
    expect(recordSpreadOffset(11.2, skewed)).toBeNull()
    // Identical samples equal to the value up to float round-off contain it (σ = 0).
    expect(recordSpreadOffset(0.1 + 0.2, { basis: 'study-spread', min: 0.3, median: 0.3, max: 0.3, std: 0, n: 5 })).toBeNull()
  })

  it('shows periods in hours, spread included, keeping the exact seconds', () => {
    const d = recordDisplay(42882.7, { basis: 'study-spread', median: 43200, std: 360, min: 36000, max: 50400, n: 40, seed: 7 }, 's')
    expect(d.unit).toBe('h')
    expect(d.value).toBeCloseTo(11.911861, 6)
    expect(d.spread).toMatchObject({ median: 12, std: 0.1, min: 10, max: 14, n: 40, seed: 7 })
    expect(d.exact).toBe('42882.7 s')
    expect(recordDisplay(3, null, 'm s⁻¹')).toEqual({ value: 3, spread: null, unit: 'm s⁻¹', exact: '3' })
  })
})

describe('record CSV: spread centre and inputs', () => {
  const input = {
    lobeA: 4, lobeB: 5, densityA: 500, densityB: 650, massModel: 'conserve-mass', orientationB: [0.5, 0.5, 0.5, 0.5], direction: [1, 0, 0],
    orbit: { kind: 'bound', semiMajorAxis: 40000, eccentricity: 0.7 }, overlapDepth: 400, spinA: 'synchronous', spinB: 'synchronous',
    spread: { seed: 11, samples: 40, densityA: { kind: 'uniform', min: 300, max: 1200 }, densityB: { kind: 'uniform', min: 300, max: 1200 }, coneHalfAngleDeg: 15, scale: { kind: 'fixed', value: 1 } },
  }
  const study = value({
    id: 7, quantityKey: 'contact.speed', label: 'Contact speed', subject: 'lobe-pair', subjectLabel: 'lobe pair (approach)', value: 3.32688, unit: 'm s⁻¹',
    spread: { basis: 'study-spread', min: 3.07, median: 4.07259, max: 5.22, mean: 4.073, std: 0.517743, n: 40, seed: 11, samples: 40, priors: 'densityA uniform' },
    source: { type: 'study', id: 3 },
    provenance: { source: 'study', study: { id: 3, title: 't', input }, lobeA: { sha256: 'aa', densityKgM3: 1000 }, lobeB: { sha256: 'bb', densityKgM3: 1000 }, algorithmVersion: 'alg 2' },
  })
  const spinning = value({ id: 8, provenance: { source: 'lobe', lobe: { id: 4, sha256: 'cc', densityKgM3: 900, spinPeriodHours: 4, referenceRadiusM: null }, algorithmVersion: 'alg 1' } })
  const rec: RecordExport = { object: { id: 1, designation: '2041 KD9', name: 'Demo', population: 'other' }, cautions: [], currentValues: [study, spinning] }
  const [header, s, l] = parse(recordCsv(rec))
  const col = (n: string) => header!.indexOf(n)

  it('writes the spread\'s own centre, σ, range and a note when it is off the value', () => {
    expect(Number(s![col('spread_median')])).toBe(4.07259)
    expect(Number(s![col('spread_mean')])).toBe(4.073)
    expect(Number(s![col('spread_sd')])).toBe(0.517743)
    expect([s![col('spread_min')], s![col('spread_max')], s![col('spread_low')], s![col('spread_high')]]).toEqual(['3.07', '5.22', '3.07', '5.22'])
    expect([s![col('spread_n')], s![col('spread_seed')], s![col('spread_priors')]]).toEqual(['40', '11', 'densityA uniform'])
    expect(s![col('spread_centre_note')]).toContain('not centred on the nominal value')
    expect(l![col('spread_centre_note')]).toBe('')
  })

  it('splits the two densities of a study value and carries the study inputs as JSON', () => {
    // The study's own densities (500, 650), not the lobes' stated 1000.
    expect([s![col('density_a_kg_m3')], s![col('density_b_kg_m3')], s![col('density_kg_m3')]]).toEqual(['500', '650', ''])
    expect([l![col('density_a_kg_m3')], l![col('density_b_kg_m3')], l![col('density_kg_m3')]]).toEqual(['', '', '900'])
    expect(JSON.parse(s![col('inputs_json')]!)).toEqual({ source: 'study', studyId: 3, ...input })
    expect(s![col('subject_label')]).toBe('lobe pair (approach)')
  })

  it('gives the spin of the lobe behind a lobe value in seconds', () => {
    expect(Number(l![col('spin_period_s')])).toBe(4 * 3600)
    expect(JSON.parse(l![col('inputs_json')]!)).toMatchObject({ source: 'lobe', lobeId: 4, densityKgM3: 900, spinPeriodS: 14400, spin: 'rotating' })
    expect(s![col('spin_period_s')]).toBe('')
  })

  it('puts the off-centre note and both densities in the citation', () => {
    const text = recordCitation(rec, { link: 'l', exportedAt: new Date(0), softwareVersion: 'v' })
    expect(text).toContain('Contact speed (contact.speed, lobe pair (approach)) = 3.32688 m s⁻¹ (study spread over sampled inputs: median 4.07259, mean 4.073, σ 0.517743, range [3.07, 5.22], n 40)')
    expect(text).toMatch(/NOTE: The spread is not centred on the nominal value/)
    expect(text).toContain('lobe A mesh  sha256 aa, density 500 kg m⁻³')
    expect(text).toContain('lobe spin: period 14400 s (4 h)')
  })
})
