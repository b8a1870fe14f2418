/**
 * Text forms of an object record: CSV of the current values and a plain-text citation block.
 * Numbers are written in JavaScript's shortest round-trip form (`String(x)`), so every float64
 * value parses back to the identical number; nothing is rounded.
 */

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

/**
 * "± sd", "[min, max]" or the numeric fields of a spread, with what it means. A study spread has its
 * own centre (its samples' mean and median), which need not be the nominal value it is shown beside:
 * when the spread states them they are written out, so "± σ" is never read as centred on the nominal.
 */
export function recordSpreadText(spread: Record<string, number | string> | null | undefined): string {
  if (!spread) return ''
  const n = (k: string) => (typeof spread[k] === 'number' ? spread[k] as number : undefined)
  const basis = spread.basis === 'surface-range' ? 'range over the surface' : 'study spread'
  const sd = n('sd') ?? n('std')
  const mean = n('mean')
  const median = n('median')
  if (sd !== undefined && mean !== undefined) {
    return `(${basis}: mean ${recordNumberText(mean)} ± ${recordNumberText(sd)} 1σ${median !== undefined ? `, median ${recordNumberText(median)}` : ''})`
  }
  if (sd !== undefined) return `± ${recordNumberText(sd)} (${basis}, 1σ)`
  const lo = n('min') ?? n('low') ?? n('p05') ?? n('p16')
  const hi = n('max') ?? n('high') ?? n('p95') ?? n('p84')
  if (lo !== undefined && hi !== undefined) return `[${recordNumberText(lo)}, ${recordNumberText(hi)}] (${basis})`
  const nums = Object.entries(spread).filter(([, v]) => typeof v === 'number') as [string, number][]
  return nums.length ? `${nums.map(([k, v]) => `${k} ${recordNumberText(v)}`).join(', ')} (${basis})` : ''
}

/** RFC 4180 cell: quoted when it holds a comma, quote or line break. */
export function recordCsvCell(v: string | number | null | undefined): string {
  if (v === null || v === undefined) return ''
  const s = typeof v === 'number' ? recordNumberText(v) : v
  return /[",\r\n]/.test(s) || /^\s|\s$/.test(s) ? `"${s.replace(/"/g, '""')}"` : s
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

export const RECORD_CSV_COLUMNS = [
  'designation', 'attachment_id', 'quantity', 'label', 'component', 'subject', 'value', 'unit',
  'spread_basis', 'spread_low', 'spread_high', 'spread_sd', 'reference_radius_m', 'source', 'source_id',
  'mesh_sha256', 'density_kg_m3', 'algorithm_version', 'proposed_by', 'proposed_at', 'accepted_by', 'accepted_at',
] as const

/**
 * CSV of the current (accepted) values: one row per scalar, one row per component of a vector.
 * UTF-8, CRLF line ends, header row first.
 */
export function recordCsv(rec: RecordExport): string {
  const lines = [RECORD_CSV_COLUMNS.join(',')]
  for (const v of rec.currentValues) {
    const s = v.spread
    const num = (k: string) => (s && typeof s[k] === 'number' ? s[k] as number : undefined)
    const common = {
      spread_basis: s ? str(s.basis) : '',
      spread_low: num('min') ?? num('low') ?? num('p05') ?? num('p16'),
      spread_high: num('max') ?? num('high') ?? num('p95') ?? num('p84'),
      spread_sd: num('sd') ?? num('std'),
    }
    const values: [string, number][] = Array.isArray(v.value)
      ? v.value.map((x, i) => [v.components?.[i] ?? String(i), x])
      : [['', v.value]]
    for (const [component, x] of values) {
      const row: Record<(typeof RECORD_CSV_COLUMNS)[number], string | number | null | undefined> = {
        designation: rec.object.designation,
        attachment_id: v.id,
        quantity: v.quantityKey,
        label: v.label,
        component,
        subject: v.subject,
        value: x,
        unit: v.unit,
        ...(Array.isArray(v.value) ? { spread_basis: '', spread_low: undefined, spread_high: undefined, spread_sd: undefined } : common),
        reference_radius_m: v.referenceRadius,
        source: v.source.type,
        source_id: v.source.id,
        mesh_sha256: recordMeshHashes(v.provenance).join(' '),
        density_kg_m3: recordDensities(v.provenance).map(recordNumberText).join(' '),
        algorithm_version: str(v.provenance.algorithmVersion),
        proposed_by: v.proposedBy?.name,
        proposed_at: iso(v.proposedAt),
        accepted_by: v.reviewedBy?.name,
        accepted_at: iso(v.reviewedAt),
      }
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
    const meshes = [p.lobe, p.lobeA, p.lobeB].filter(b => b && typeof b === 'object') as Record<string, unknown>[]
    for (const m of meshes) {
      out.push(`    mesh ${str(m.sourceFileName)} sha256 ${str(m.sha256)}, density ${typeof m.densityKgM3 === 'number' ? recordNumberText(m.densityKgM3) : '?'} kg m⁻³`)
    }
    const study = p.study as Record<string, unknown> | undefined
    if (study) out.push(`    study #${str(study.id)}${study.title ? ` "${str(study.title)}"` : ''}, inputs ${JSON.stringify(study.input)}`)
    out.push(`    ${str(p.algorithmVersion)}; attachment #${v.id}, proposed by ${v.proposedBy?.name ?? '?'} ${iso(v.proposedAt)}, accepted by ${v.reviewedBy?.name ?? '?'} ${iso(v.reviewedAt)}`)
  }
  out.push('', 'Cautions:', ...rec.cautions.map(c => `- ${c}`))
  return out.join('\n') + '\n'
}
