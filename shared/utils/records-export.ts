/**
 * Text forms of an object record: CSV of the current values and a plain-text citation block.
 * Numbers are written in JavaScript's shortest round-trip form (`String(x)`), so every float64
 * value parses back to the identical number; nothing is rounded.
 */

import { csvCell } from './csv'

export interface RecordExportValue {
  id: number
  quantityKey: string
  label: string
  components: string[] | null
  subject: string
  subjectLabel: string
  value: number | number[]
  unit: string
  spread: Record<string, number | string> | null
  referenceRadius: number | null
  state: string
  source: { type: 'lobe' | 'study', id: number | null }
  provenance: Record<string, unknown>
  proposedBy: { id: number, name: string } | null
  proposedAt: string | Date
  reviewedBy: { id: number, name: string } | null
  reviewedAt: string | Date | null
}

export interface RecordExport {
  object: { id: number, designation: string, name: string, population: string }
  currentValues: RecordExportValue[]
  cautions: string[]
}

/** Shortest text that parses back to exactly `v` (float64). */
export function recordNumberText(v: number): string {
  return String(v)
}

export function recordValueText(value: number | number[]): string {
  return Array.isArray(value) ? `[${value.map(recordNumberText).join(', ')}]` : recordNumberText(value)
}

type SpreadLike = Record<string, number | string> | null | undefined

/** A spread read into named parts; any part may be missing. */
export interface RecordSpreadParts {
  basis: 'surface-range' | 'study-spread' | string
  median?: number
  mean?: number
  /** One standard deviation of the samples (the spread's own σ, not an error bar on the nominal value). */
  sd?: number
  min?: number
  max?: number
  n?: number
}

export function recordSpreadParts(spread: SpreadLike): RecordSpreadParts | null {
  if (!spread) return null
  const n = (...keys: string[]) => {
    for (const k of keys) if (typeof spread[k] === 'number' && Number.isFinite(spread[k])) return spread[k] as number
    return undefined
  }
  return {
    basis: typeof spread.basis === 'string' ? spread.basis : 'spread',
    median: n('median'),
    mean: n('mean'),
    sd: n('sd', 'std'),
    min: n('min', 'low', 'p05', 'p16'),
    max: n('max', 'high', 'p95', 'p84'),
    n: n('n'),
  }
}

/**
 * How far a study spread's centre (its median, else its mean) sits from the nominal value it is
 * shown beside, and whether the value lies outside the spread's range [min, max]; null when the
 * spread is centred on the value and contains it, or cannot say (vectors, surface ranges).
 *
 * A spread samples its own inputs (a density range, a cone of directions), so its centre need not be
 * the nominal run's value. "Centred" allows for sampling noise: the offset must exceed twice the
 * large-sample standard error of a median, sqrt(π/2)·σ/√n (normal parent; Kendall & Stuart, The
 * Advanced Theory of Statistics, vol. 1, §10.10 [mem]), and at least 0.1 σ (common practice, no source).
 * A value outside [min, max] is reported whatever the offset (`outside`: 'below' every sample or 'above').
 */
export function recordSpreadOffset(value: number | number[], spread: SpreadLike): { centre: number, by: number, sigmas: number | null, centred: boolean, outside: 'below' | 'above' | null, min?: number, max?: number } | null {
  const p = recordSpreadParts(spread)
  if (!p || p.basis !== 'study-spread' || Array.isArray(value) || !Number.isFinite(value)) return null
  const centre = p.median ?? p.mean
  if (centre === undefined) return null
  const by = centre - value
  // Outside [min, max] beyond float round-off (1e-9 relative; common practice, no source): a spread of
  // identical samples equal to the value, up to the last bits, contains it.
  const tol = 1e-9 * Math.max(Math.abs(value), Math.abs(p.min ?? 0), Math.abs(p.max ?? 0))
  const outside = p.min !== undefined && value < p.min - tol ? 'below' : p.max !== undefined && value > p.max + tol ? 'above' : null
  let centred: boolean
  if (p.sd !== undefined && p.sd > 0) {
    const noise = p.n !== undefined && p.n > 0 ? 2 * Math.sqrt(Math.PI / 2) * p.sd / Math.sqrt(p.n) : 0
    centred = Math.abs(by) <= Math.max(0.1 * p.sd, noise)
  }
  else {
    centred = Math.abs(by) <= 1e-9 * Math.max(Math.abs(centre), Math.abs(value))
  }
  if (centred && !outside) return null
  return { centre, by, sigmas: p.sd !== undefined && p.sd > 0 ? by / p.sd : null, centred, outside, min: p.min, max: p.max }
}

/**
 * The spread in words, with what it is: a study spread names its own centre (median, mean), σ, range
 * and sample count, so "± σ" is never read as an error bar centred on the nominal value; a surface
 * range is a range over the surface. `fmt` writes numbers (default: exact float64 text).
 */
export function recordSpreadText(spread: SpreadLike, fmt: (v: number) => string = recordNumberText): string {
  const p = recordSpreadParts(spread)
  if (!p) return ''
  if (p.basis === 'surface-range') {
    return p.min !== undefined && p.max !== undefined ? `[${fmt(p.min)}, ${fmt(p.max)}] (range over the surface)` : ''
  }
  const parts: string[] = []
  if (p.median !== undefined) parts.push(`median ${fmt(p.median)}`)
  if (p.mean !== undefined) parts.push(`mean ${fmt(p.mean)}`)
  if (p.sd !== undefined) parts.push(`σ ${fmt(p.sd)}`)
  if (p.min !== undefined && p.max !== undefined) parts.push(`range [${fmt(p.min)}, ${fmt(p.max)}]`)
  if (p.n !== undefined) parts.push(`n ${fmt(p.n)}`)
  if (!parts.length) return ''
  return `(${p.basis === 'study-spread' ? 'study spread over sampled inputs' : p.basis}: ${parts.join(', ')})`
}

/**
 * A plain note when a study spread is not centred on the nominal value or does not contain it, else ''.
 * @param unit printed after the offset ('' or '1' for none)
 */
export function recordSpreadNote(value: number | number[], spread: SpreadLike, unit = '', fmt: (v: number) => string = recordNumberText): string {
  const off = recordSpreadOffset(value, spread)
  if (!off) return ''
  const u = unit && unit !== '1' ? ` ${unit}` : ''
  const sig = off.sigmas === null ? '' : `, ${Math.abs(off.sigmas).toFixed(2)}σ`
  const range = off.min !== undefined && off.max !== undefined ? ` [${fmt(off.min)}, ${fmt(off.max)}]${u}` : ''
  const outside = off.outside ? `The nominal value ${fmt(value as number)}${u} lies outside the spread's range${range} (${off.outside} every sample). ` : ''
  const centre = off.centred ? '' : `The spread is not centred on the nominal value: its centre ${fmt(off.centre)}${u} lies ${fmt(Math.abs(off.by))}${u} ${off.by > 0 ? 'above' : 'below'} it${sig}. `
  return centre + outside
    + 'The spread sampled different inputs (e.g. a density range) from the nominal run; quote its centre with its σ, not the nominal value.'
}

/** A record CSV cell: the shared writer (quoting, formula neutralising) with the records' number form. */
export function recordCsvCell(v: string | number | null | undefined): string {
  return csvCell(v, recordNumberText)
}

function iso(d: string | Date | null | undefined): string {
  if (!d) return ''
  return new Date(d).toISOString()
}

function str(v: unknown): string {
  return typeof v === 'string' ? v : v === undefined || v === null ? '' : String(v)
}

/** sha256 of the mesh(es) behind a value, from its provenance. */
export function recordMeshHashes(p: Record<string, unknown>): string[] {
  const blocks = [p.lobe, p.lobeA, p.lobeB].filter(b => b && typeof b === 'object') as Record<string, unknown>[]
  return blocks.map(b => str(b.sha256)).filter(Boolean)
}

export function recordDensities(p: Record<string, unknown>): number[] {
  const blocks = [p.lobe, p.lobeA, p.lobeB].filter(b => b && typeof b === 'object') as Record<string, unknown>[]
  return blocks.map(b => b.densityKgM3).filter((d): d is number => typeof d === 'number')
}

const num = (v: unknown): number | undefined => (typeof v === 'number' && Number.isFinite(v) ? v : undefined)
const obj = (v: unknown): Record<string, unknown> | undefined => (v && typeof v === 'object' && !Array.isArray(v) ? v as Record<string, unknown> : undefined)

/**
 * The densities (kg m⁻³) a value was computed with: one for a lobe value; lobe A's and lobe B's for a
 * study value (the study's own densities when it set them, else the lobes' stated ones).
 */
export function recordValueDensities(p: Record<string, unknown>): { single?: number, a?: number, b?: number } {
  const input = obj(obj(p.study)?.input)
  if (p.source === 'study' || p.lobeA || p.lobeB) {
    return { a: num(input?.densityA) ?? num(obj(p.lobeA)?.densityKgM3), b: num(input?.densityB) ?? num(obj(p.lobeB)?.densityKgM3) }
  }
  return { single: num(obj(p.lobe)?.densityKgM3) }
}

/** Spin period (s) of the lobe behind a lobe value, or null when the lobe was not rotating / a study value. */
export function recordLobeSpinPeriodS(p: Record<string, unknown>): number | null {
  const h = num(obj(p.lobe)?.spinPeriodHours)
  return h !== undefined && h > 0 ? h * 3600 : null
}

/**
 * The inputs needed to recompute a value, as one JSON object: for a study value the study inputs as
 * run (orbit kind and parameters, orientation quaternion of B, approach direction, settling depth,
 * mass model, densities, spins, spread seed and priors); for a lobe value its density, reference
 * radius and spin. SI units (m, m s⁻¹, kg m⁻³, rad s⁻¹, s) as in the study form.
 */
export function recordInputs(p: Record<string, unknown>): Record<string, unknown> {
  const study = obj(p.study)
  if (study) return { source: 'study', studyId: study.id ?? null, ...(obj(study.input) ?? {}) }
  const lobe = obj(p.lobe) ?? {}
  const spin = recordLobeSpinPeriodS(p)
  return { source: 'lobe', lobeId: lobe.id ?? null, densityKgM3: lobe.densityKgM3 ?? null, referenceRadiusM: lobe.referenceRadiusM ?? null, spinPeriodS: spin, spin: spin === null ? 'not rotating' : 'rotating' }
}

/**
 * CSV columns. The first 22 are the original layout (outside tools rely on those names); later ones
 * were added: the spread's own centre, σ, range, count and seed/priors, a note when it is not centred
 * on the value, the two densities of a study value, the lobe spin and the inputs as JSON.
 * `spread_low`/`spread_high` equal `spread_min`/`spread_max`; `density_kg_m3` holds a lobe value's
 * single density and is empty for study values (see density_a_kg_m3 / density_b_kg_m3).
 */
export const RECORD_CSV_COLUMNS = [
  'designation', 'attachment_id', 'quantity', 'label', 'component', 'subject', 'value', 'unit',
  'spread_basis', 'spread_low', 'spread_high', 'spread_sd', 'reference_radius_m', 'source', 'source_id',
  'mesh_sha256', 'density_kg_m3', 'algorithm_version', 'proposed_by', 'proposed_at', 'accepted_by', 'accepted_at',
  'subject_label', 'spread_median', 'spread_mean', 'spread_min', 'spread_max', 'spread_n', 'spread_seed', 'spread_priors',
  'spread_centre_note', 'density_a_kg_m3', 'density_b_kg_m3', 'spin_period_s', 'inputs_json',
] as const

type CsvRow = Record<(typeof RECORD_CSV_COLUMNS)[number], string | number | null | undefined>

/**
 * CSV of the current (accepted) values: one row per scalar, one row per component of a vector.
 * UTF-8, CRLF line ends, header row first. Numbers at full float64 precision.
 */
export function recordCsv(rec: RecordExport): string {
  const lines = [RECORD_CSV_COLUMNS.join(',')]
  for (const v of rec.currentValues) {
    const s = v.spread
    const parts = Array.isArray(v.value) ? null : recordSpreadParts(s)
    const d = recordValueDensities(v.provenance)
    const common: Omit<CsvRow, 'component' | 'value'> = {
      designation: rec.object.designation,
      attachment_id: v.id,
      quantity: v.quantityKey,
      label: v.label,
      subject: v.subject,
      unit: v.unit,
      spread_basis: parts ? str(s?.basis) : '',
      spread_low: parts?.min,
      spread_high: parts?.max,
      spread_sd: parts?.sd,
      reference_radius_m: v.referenceRadius,
      source: v.source.type,
      source_id: v.source.id,
      mesh_sha256: recordMeshHashes(v.provenance).join(' '),
      density_kg_m3: d.single,
      algorithm_version: str(v.provenance.algorithmVersion),
      proposed_by: v.proposedBy?.name,
      proposed_at: iso(v.proposedAt),
      accepted_by: v.reviewedBy?.name,
      accepted_at: iso(v.reviewedAt),
      subject_label: v.subjectLabel,
      spread_median: parts?.median,
      spread_mean: parts?.mean,
      spread_min: parts?.min,
      spread_max: parts?.max,
      spread_n: parts?.n,
      spread_seed: parts && typeof s?.seed === 'number' ? s.seed : undefined,
      spread_priors: parts && typeof s?.priors === 'string' ? s.priors : undefined,
      spread_centre_note: parts ? recordSpreadNote(v.value, s, v.unit) : '',
      density_a_kg_m3: d.a,
      density_b_kg_m3: d.b,
      spin_period_s: recordLobeSpinPeriodS(v.provenance),
      inputs_json: JSON.stringify(recordInputs(v.provenance)),
    }
    const values: [string, number][] = Array.isArray(v.value)
      ? v.value.map((x, i) => [v.components?.[i] ?? String(i), x])
      : [['', v.value]]
    for (const [component, x] of values) {
      const row: CsvRow = { ...common, component, value: x }
      lines.push(RECORD_CSV_COLUMNS.map(c => recordCsvCell(row[c])).join(','))
    }
  }
  return lines.join('\r\n') + '\r\n'
}

/** Plain-text citation block: how to cite the record, then each current value with its provenance, then the cautions. */
export function recordCitation(rec: RecordExport, opts: { link: string, exportedAt: Date, softwareVersion: string }): string {
  const o = rec.object
  const out = [
    `${o.designation} (${o.name}) — Isthmus object record #${o.id}`,
    `Cite as: Isthmus team record "${o.designation}", ${opts.link}, retrieved ${opts.exportedAt.toISOString()}; Isthmus ${opts.softwareVersion}.`,
    '',
    rec.currentValues.length ? 'Accepted values (model estimates, not measurements):' : 'No accepted values yet.',
  ]
  for (const v of rec.currentValues) {
    const p = v.provenance
    const spread = recordSpreadText(v.spread)
    const r = v.referenceRadius === null ? '' : `, reference radius ${recordNumberText(v.referenceRadius)} m`
    out.push(`- ${v.label} (${v.quantityKey}, ${v.subjectLabel}) = ${recordValueText(v.value)} ${v.unit}${spread ? ` ${spread}` : ''}${r}`)
    const note = recordSpreadNote(v.value, v.spread, v.unit)
    if (note) out.push(`    NOTE: ${note}`)
    const d = recordValueDensities(p)
    const meshes = ([['', p.lobe, d.single], ['lobe A ', p.lobeA, d.a], ['lobe B ', p.lobeB, d.b]] as const)
      .filter(([, b]) => b && typeof b === 'object') as unknown as [string, Record<string, unknown>, number | undefined][]
    for (const [which, m, density] of meshes) {
      out.push(`    ${which}mesh ${str(m.sourceFileName)} sha256 ${str(m.sha256)}, density ${density !== undefined ? recordNumberText(density) : '?'} kg m⁻³`)
    }
    const study = p.study as Record<string, unknown> | undefined
    if (study) out.push(`    study #${str(study.id)}${study.title ? ` "${str(study.title)}"` : ''}, inputs (SI: m, m s⁻¹, kg m⁻³, rad s⁻¹, s, unless the name says otherwise: …Deg degrees, …Au au, …Hours hours) ${JSON.stringify(study.input)}`)
    else if (p.lobe) {
      const spin = recordLobeSpinPeriodS(p)
      out.push(`    lobe spin: ${spin === null ? 'not rotating' : `period ${recordNumberText(spin)} s (${recordNumberText(spin / 3600)} h)`}`)
    }
    out.push(`    ${str(p.algorithmVersion)}; attachment #${v.id}, proposed by ${v.proposedBy?.name ?? '?'} ${iso(v.proposedAt)}, accepted by ${v.reviewedBy?.name ?? '?'} ${iso(v.reviewedAt)}`)
  }
  out.push('', 'Cautions:', ...rec.cautions.map(c => `- ${c}`))
  return out.join('\n') + '\n'
}

const SECONDS_PER_HOUR = 3600
/** Spread fields that are counts or seeds, never rescaled with the unit. */
const UNSCALED_SPREAD_FIELDS = new Set(['n', 'samples', 'seed', 'contacts'])

export interface RecordDisplayValue {
  value: number | number[]
  spread: Record<string, number | string> | null
  unit: string
  exact: string
}
/**
 * A value as the record pages show it: periods stored in seconds are shown in hours (the spread
 * rescaled with them), everything else as stored. `exact` is the stored value in its stored unit
 * at full precision, for a tooltip. Exports never use this (they stay SI).
 */
export function recordDisplay(value: number | number[], spread: Record<string, number | string> | null, unit: string): RecordDisplayValue {
  const exact = recordValueText(value)
  if (unit !== 's') return { value, spread, unit, exact }
  const h = (x: number) => x / SECONDS_PER_HOUR
  const scaled = spread
    ? Object.fromEntries(Object.entries(spread).map(([k, v]) => [k, typeof v === 'number' && !UNSCALED_SPREAD_FIELDS.has(k) ? h(v) : v]))
    : null
  return { value: Array.isArray(value) ? value.map(h) : h(value), spread: scaled, unit: 'h', exact: `${exact} s` }
}
