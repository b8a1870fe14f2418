/**
 * Citable exports of an object record's accepted values: CSL-JSON (the citation format of CSL
 * processors and reference managers) and BibTeX, both written by citation-js — never by hand — from
 * one CSL item per value. Each item carries the record, the value, quantity, unit and subject, the
 * provenance (mesh sha256, densities, the approach for study values, software and algorithm
 * versions) and the date it was accepted; the value is rounded to the significant figures its
 * stated uncertainty supports, or given at full float64 precision when it states none.
 */
import { recordInputs, recordMeshHashes, recordNumberText, recordSpreadParts, recordValueDensities, recordValueText, type RecordExport, type RecordExportValue } from '#shared/utils/records-export'

let engine: Promise<typeof import('@citation-js/core')> | undefined
/**
 * citation-js with its BibTeX plugin, loaded once on first use. Loaded dynamically: the plugin
 * registers itself by side effect, which the server bundle would otherwise drop, and pages never
 * need the library.
 */
function citationJs() {
  engine ??= import('@citation-js/core').then(async (core) => {
    await import('@citation-js/plugin-bibtex')
    return core
  })
  return engine
}

/**
 * A value written to the precision of its uncertainty: the uncertainty to two significant figures
 * and the value rounded at the same decimal place ("the numerical value of the uncertainty should
 * be given to at most two significant digits", JCGM 100:2008 (GUM) §7.2.6). Writes both with one
 * power of ten outside [10⁻³, 10⁶).
 * @param u one standard uncertainty, same unit as `value`; must be finite and > 0
 * @returns the texts and the number of significant figures of the value
 */
export function roundToUncertainty(value: number, u: number): { value: string, uncertainty: string, significantFigures: number } {
  if (!(Number.isFinite(u) && u > 0) || !Number.isFinite(value)) throw new Error(`roundToUncertainty: uncertainty must be finite and positive, got ${u}`)
  let place = Math.floor(Math.log10(u)) - 1
  // Rounding may carry the uncertainty to three digits (99.6 → 100): round again one place up.
  if (Math.round(u / 10 ** place) >= 100) place += 1
  const ur = Math.round(u / 10 ** place)
  const vr = Math.round(value / 10 ** place)
  const lead = vr === 0 ? place : Math.floor(Math.log10(Math.abs(vr))) + place
  const significantFigures = Math.max(1, lead - place + 1)
  const big = Math.abs(vr * 10 ** place)
  const e = big === 0 || (big >= 1e-3 && big < 1e6) ? 0 : lead
  const decimals = Math.max(0, e - place)
  const fmt = (n: number) => (n * 10 ** (place - e)).toFixed(decimals)
  const tail = e === 0 ? '' : `e${e}`
  return { value: `${fmt(vr)}${tail}`, uncertainty: `${fmt(ur)}${tail}`, significantFigures }
}

/** The stated standard uncertainty of a value: the σ of its study spread (scalars only), else null. */
export function recordStatedUncertainty(v: Pick<RecordExportValue, 'value' | 'spread'>): number | null {
  if (Array.isArray(v.value)) return null
  const p = recordSpreadParts(v.spread)
  return p && p.basis === 'study-spread' && p.sd !== undefined && p.sd > 0 ? p.sd : null
}

/** The value as cited: rounded to its uncertainty when it states one, else full precision. */
export function recordCitedValue(v: Pick<RecordExportValue, 'value' | 'spread'>) {
  const u = recordStatedUncertainty(v)
  if (u === null) return { text: recordValueText(v.value), uncertainty: null, significantFigures: null, precision: 'full float64 precision (no stated uncertainty)' }
  const r = roundToUncertainty(v.value as number, u)
  return { text: `${r.value} ± ${r.uncertainty}`, uncertainty: r.uncertainty, significantFigures: r.significantFigures, precision: `${r.significantFigures} significant figures from the stated uncertainty (σ of the study spread over sampled inputs, 2 significant figures)` }
}

const ASCII_UNIT: Record<string, string> = { '⁻': '-', '¹': '1', '²': '2', '³': '3', '⁴': '4' }
/** Units with superscripts in plain ASCII (kg m⁻³ → kg m-3), safe in BibTeX. */
function asciiUnit(unit: string): string {
  return unit === '1' ? '1 (dimensionless)' : unit.replace(/[⁻¹²³⁴]/g, c => ASCII_UNIT[c]!)
}

function dateParts(d: string | Date | null | undefined): { 'date-parts': number[][] } | undefined {
  if (!d) return undefined
  const t = new Date(d)
  return { 'date-parts': [[t.getUTCFullYear(), t.getUTCMonth() + 1, t.getUTCDate()]] }
}

const obj = (v: unknown) => (v && typeof v === 'object' && !Array.isArray(v) ? v as Record<string, unknown> : undefined)

/** The approach of a study value in words (orbit, direction, orientation, settling), or null for lobe values. */
export function recordApproachText(p: Record<string, unknown>): string | null {
  const study = obj(p.study)
  const input = obj(study?.input)
  if (!study || !input) return null
  const orbit = obj(input.orbit) ?? {}
  const orbitText = orbit.kind === 'bound'
    ? `bound orbit, a = ${String(orbit.semiMajorAxis)} m, e = ${String(orbit.eccentricity)}`
    : orbit.kind === 'hyperbolic'
      ? `hyperbolic, v_inf = ${String(orbit.vInfinity)} m/s, pericentre ${String(orbit.pericentre ?? 0)} m`
      : `${String(orbit.kind ?? '?')}, pericentre ${String(orbit.pericentre ?? 0)} m`
  return `study #${String(study.id)}: ${orbitText}; approach direction ${JSON.stringify(input.direction)} (lobe A frame); orientation of B ${JSON.stringify(input.orientationB)} (quaternion w,x,y,z); overlap depth ${String(input.overlapDepth ?? 0)} m`
}

/**
 * One CSL-JSON item (type `dataset`) per accepted value. `note` repeats the provenance as
 * `name: value` pairs separated by "; " (BibTeX keeps only the note); `custom.isthmus` carries it
 * structured, numbers at full float64 precision.
 */
export function recordCslItems(rec: RecordExport & { object: { name: string } }, opts: { link: string, exportedAt: Date, softwareVersion: string }) {
  const o = rec.object
  // BibTeX keys: letters, digits and underscores only (citation-js replaces any other key by one of its own).
  const slug = o.designation.normalize('NFKD').replace(/[^A-Za-z0-9]+/g, '').toLowerCase() || 'record'
  return rec.currentValues.map((v) => {
    const p = v.provenance
    const cited = recordCitedValue(v)
    const d = recordValueDensities(p)
    const densities = d.single !== undefined ? `${recordNumberText(d.single)} kg m-3` : `lobe A ${d.a ?? '?'} kg m-3, lobe B ${d.b ?? '?'} kg m-3`
    const meshes = recordMeshHashes(p)
    const approach = recordApproachText(p)
    const unit = asciiUnit(v.unit)
    const key = `isthmus_${slug}_${v.id}`
    const fields: [string, string][] = [
      ['record', `${o.designation} (${o.name}), Isthmus object record #${o.id}`],
      ['quantity', `${v.label} [${v.quantityKey}]`],
      ['subject', `${v.subjectLabel} [${v.subject}]`],
      ['value', `${cited.text} ${unit}`],
      ['exact value', `${recordValueText(v.value)} ${unit}`],
      ['precision', cited.precision],
      ['unit', unit],
      ...(v.referenceRadius !== null ? [['reference radius', `${recordNumberText(v.referenceRadius)} m`] as [string, string]] : []),
      ['mesh sha256', meshes.join(', ') || 'unknown'],
      ['density', densities],
      ['approach', approach ?? 'none (single-lobe value)'],
      ['software', `Isthmus ${String(p.softwareVersion ?? '?')}`],
      ['algorithm', String(p.algorithmVersion ?? '?')],
      ['accepted', v.reviewedAt ? new Date(v.reviewedAt).toISOString() : 'not accepted'],
      ['attachment', `#${v.id}`],
      ['caution', 'model estimate under stated assumptions (density, homogeneity, mesh as given), not a measurement'],
    ]
    return {
      'id': key,
      'citation-key': key,
      'type': 'dataset',
      'title': `${o.designation} (${o.name}), ${v.subjectLabel}: ${v.label} = ${cited.text} ${unit}`,
      'author': [{ literal: v.proposedBy?.name ?? 'Isthmus team' }],
      'issued': dateParts(v.reviewedAt),
      'accessed': dateParts(opts.exportedAt),
      'publisher': 'Isthmus',
      'genre': 'model estimate',
      'version': opts.softwareVersion,
      'URL': opts.link,
      'note': fields.map(([k, val]) => `${k}: ${val}`).join('; '),
      'custom': {
        isthmus: {
          record: { id: o.id, designation: o.designation, name: o.name },
          attachmentId: v.id,
          quantity: v.quantityKey,
          label: v.label,
          subject: v.subject,
          subjectLabel: v.subjectLabel,
          value: v.value,
          unit: v.unit,
          citedValue: cited.text,
          uncertainty: recordStatedUncertainty(v),
          significantFigures: cited.significantFigures,
          referenceRadiusM: v.referenceRadius,
          meshSha256: meshes,
          densityKgM3: d.single ?? null,
          densityAKgM3: d.a ?? null,
          densityBKgM3: d.b ?? null,
          approach,
          inputs: recordInputs(p),
          softwareVersion: p.softwareVersion ?? null,
          algorithmVersion: p.algorithmVersion ?? null,
          acceptedAt: v.reviewedAt ? new Date(v.reviewedAt).toISOString() : null,
          acceptedBy: v.reviewedBy?.name ?? null,
        },
      },
    }
  })
}

/** CSL-JSON (an array of items), as citation-js writes it. */
export async function recordCslJson(rec: RecordExport & { object: { name: string } }, opts: { link: string, exportedAt: Date, softwareVersion: string }): Promise<string> {
  const { Cite } = await citationJs()
  return new Cite(recordCslItems(rec, opts)).format('data', { format: 'text' }) as string
}

/** BibTeX (@misc per value; the provenance in `note`), as citation-js writes it. */
export async function recordBibtex(rec: RecordExport & { object: { name: string } }, opts: { link: string, exportedAt: Date, softwareVersion: string }): Promise<string> {
  const items = recordCslItems(rec, opts)
  if (!items.length) return `% ${rec.object.designation}: no accepted values yet, nothing to cite.\n`
  const { Cite } = await citationJs()
  return new Cite(items).format('bibtex', { format: 'text' }) as string
}
