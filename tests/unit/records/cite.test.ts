import { describe, expect, it } from 'vitest'
import { Cite } from '@citation-js/core'
import '@citation-js/plugin-bibtex'
import { recordBibtex, recordCitedValue, recordCslJson, roundToUncertainty } from '../../../server/utils/records-cite'
import type { RecordExport, RecordExportValue } from '../../../shared/utils/records-export'

const SHA_A = 'a1'.repeat(32)
const SHA_B = 'b2'.repeat(32)

function value(over: Partial<RecordExportValue>): RecordExportValue {
  return {
    id: 1, quantityKey: 'J2', label: 'J2 (unnormalised, principal frame)', components: null, subject: 'lobe-a', subjectLabel: 'lobe A', value: 0.123456789, unit: '1', spread: null,
    referenceRadius: 1500.25, state: 'accepted', source: { type: 'lobe', id: 4 },
    provenance: { source: 'lobe', lobe: { sourceFileName: 'a.obj', sha256: SHA_A, densityKgM3: 512.5 }, algorithmVersion: 'mass-properties 3', softwareVersion: '0.1.0' },
    proposedBy: { id: 2, name: 'Pia Analyst' }, proposedAt: '2030-01-01T00:00:00.000Z', reviewedBy: { id: 3, name: 'Rui Reviewer' }, reviewedAt: '2030-01-02T10:00:00.000Z', ...over,
  }
}

const study = {
  source: 'study', study: { id: 7, title: 'pair', input: { orbit: { kind: 'bound', semiMajorAxis: 30000, eccentricity: 0.5 }, direction: [1, 0, 0], orientationB: [1, 0, 0, 0], overlapDepth: 600, densityA: 480 } },
  lobeA: { sha256: SHA_A, densityKgM3: 500 }, lobeB: { sha256: SHA_B, densityKgM3: 520 }, algorithmVersion: 'contact 2', softwareVersion: '0.1.0',
}

const rec: RecordExport & { object: { name: string } } = {
  object: { id: 9, designation: '2061 AC4', name: 'Invented', population: 'other' },
  cautions: ['estimate'],
  currentValues: [
    value({ id: 11 }),
    value({ id: 12, quantityKey: 'contact.speed', label: 'Contact speed', subject: 'lobe-pair', subjectLabel: 'lobe pair (approach)', value: 0.48213377, unit: 'm s⁻¹', referenceRadius: null, source: { type: 'study', id: 7 }, provenance: study, spread: { basis: 'study-spread', median: 0.4791, std: 0.0213, n: 32 } }),
  ],
}
const opts = { link: 'http://127.0.0.1/objects/9', exportedAt: new Date('2030-02-03T00:00:00Z'), softwareVersion: '0.1.0' }

describe('significant figures from the stated uncertainty', () => {
  // Uncertainty to at most two significant digits, the value rounded at the same place: JCGM 100:2008 (GUM) §7.2.6;
  // the worked form "m_S = 100,021 47(35) g" there has the value's last digit at the uncertainty's last digit.
  it('rounds the uncertainty to two significant figures and the value at the same decimal place', () => {
    expect(roundToUncertainty(100.02147, 0.00035)).toEqual({ value: '100.02147', uncertainty: '0.00035', significantFigures: 8 })
    expect(roundToUncertainty(1.23456, 0.0123)).toEqual({ value: '1.235', uncertainty: '0.012', significantFigures: 4 })
    expect(roundToUncertainty(-3.14159, 0.00999)).toMatchObject({ value: '-3.142', uncertainty: '0.010' })
    // a rounding carry (99.6 → 100) moves the place
    expect(roundToUncertainty(12345.6, 996)).toMatchObject({ value: '12300', uncertainty: '1000', significantFigures: 3 })
    // outside [1e-3, 1e6) both share one power of ten
    expect(roundToUncertainty(1.2345e-6, 5.67e-9)).toMatchObject({ value: '1.2345e-6', uncertainty: '0.0057e-6', significantFigures: 5 })
    expect(() => roundToUncertainty(1, 0)).toThrow(/uncertainty/)
  })

  it('keeps full precision when a value states no uncertainty', () => {
    expect(recordCitedValue(value({})).text).toBe('0.123456789')
    expect(recordCitedValue(value({ spread: { basis: 'surface-range', min: 0.1, max: 0.2 } })).significantFigures).toBeNull()
    expect(recordCitedValue(rec.currentValues[1]!)).toMatchObject({ text: '0.482 ± 0.021', significantFigures: 3 })
  })
})

describe('citable exports, read back with citation-js', () => {
  it('BibTeX parses and carries record, value, quantity, unit, subject and provenance', async () => {
    const bib = await recordBibtex(rec, opts)
    const items = new Cite(bib).data as Record<string, any>[]
    // our keys survive (letters, digits, underscores), one per value
    expect(items.map(i => i.id)).toEqual(['isthmus_2061ac4_11', 'isthmus_2061ac4_12'])
    const [j2, speed] = items
    expect(j2!.title).toContain('2061 AC4')
    expect(j2!.title).toContain('lobe A')
    expect(j2!.title).toContain('J2')
    expect(j2!.issued['date-parts'][0]).toEqual([2030, 1, 2])
    for (const part of ['quantity: J2 (unnormalised, principal frame) [J2]', 'subject: lobe A [lobe-a]', 'value: 0.123456789 1 (dimensionless)', `mesh sha256: ${SHA_A}`,
      'density: 512.5 kg m-3', 'software: Isthmus 0.1.0', 'algorithm: mass-properties 3', 'accepted: 2030-01-02T10:00:00.000Z', 'reference radius: 1500.25 m', 'record: 2061 AC4 (Invented)']) {
      expect(j2!.note, part).toContain(part)
    }
    expect(speed!.title).toContain('lobe pair (approach)')
    expect(speed!.title).toContain('0.482 ± 0.021 m s-1')
    for (const part of [`mesh sha256: ${SHA_A}, ${SHA_B}`, 'density: lobe A 480 kg m-3, lobe B 520 kg m-3', 'approach: study #7: bound orbit, a = 30000 m, e = 0.5', 'significant figures from the stated uncertainty', 'algorithm: contact 2']) {
      expect(speed!.note, part).toContain(part)
    }
  })

  it('CSL-JSON parses and carries the provenance structured at full precision', async () => {
    const raw = JSON.parse(await recordCslJson(rec, opts))
    const items = new Cite(raw).data as Record<string, any>[]
    expect(items.map(i => i.type)).toEqual(['dataset', 'dataset'])
    expect(raw[1].custom.isthmus).toMatchObject({
      record: { id: 9, designation: '2061 AC4' }, quantity: 'contact.speed', subject: 'lobe-pair', value: 0.48213377, unit: 'm s⁻¹',
      meshSha256: [SHA_A, SHA_B], densityAKgM3: 480, densityBKgM3: 520, softwareVersion: '0.1.0', algorithmVersion: 'contact 2',
      acceptedAt: '2030-01-02T10:00:00.000Z', uncertainty: 0.0213, significantFigures: 3,
    })
    expect(items[0]!.URL).toBe(opts.link)
  })

  it('says so when there is nothing to cite', async () => {
    expect(await recordBibtex({ ...rec, currentValues: [] }, opts)).toMatch(/no accepted values yet/)
  })
})
