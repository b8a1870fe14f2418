/**
 * Display helpers for the contact-study page (pages only): the study's inputs as a table, the
 * cautions beside the spread, and the neck-tension caution of the merged body.
 */
import type { StudyInput } from '#shared/types/studies'
import { AU_M } from '#shared/types/studies'
import { QuantityReadError, RECORD_QUANTITIES, readQuantity } from '#shared/types/quantities'
import { recordDisplay, recordSpreadNote } from '#shared/utils/records-export'
import { fmt, fmtVec } from './format'

/** One row of a study table: label, value, unit; `keys` name the input fields (dotted paths) the row shows. */
export interface StudyRow { label: string, value: string, unit: string, help?: string, testid?: string, keys?: string[], note?: string }

type Prior = { kind: 'fixed', value: number } | { kind: 'uniform', min: number, max: number } | { kind: 'normal', mean: number, std: number }
type Spin = 'synchronous' | 'none' | [number, number, number]

/** A prior in words (numbers only; the unit goes in the unit column). */
export function studyPriorText(p: Prior): string {
  if (p.kind === 'fixed') return `fixed at ${fmt(p.value)}`
  if (p.kind === 'uniform') return `uniform ${fmt(p.min)} – ${fmt(p.max)}`
  return `normal, mean ${fmt(p.mean)}, σ ${fmt(p.std)}`
}

function spinRow(side: 'A' | 'B', spin: Spin | undefined): StudyRow {
  const s = spin ?? 'synchronous'
  const key = `spin${side}`
  if (s === 'synchronous') return { label: `Spin of lobe ${side}`, value: 'synchronous with the orbit at contact', unit: '', keys: [key] }
  if (s === 'none') return { label: `Spin of lobe ${side}`, value: 'not spinning', unit: '', keys: [key] }
  return { label: `Spin of lobe ${side}, ω (contact frame)`, value: fmtVec(s, 4), unit: 'rad s⁻¹', keys: [key] }
}

/** A length in m, with the km the form asked for beside it. */
const metresAndKm = (m: number) => `${fmt(m)} (= ${fmt(m / 1000)} km)`

/**
 * Every input of a study, as run (the stored `input`: SI units, densities filled in), as table rows
 * with units. Lobe names come from the study view. The title is the page heading and has no row.
 */
export function studyInputRows(input: StudyInput, lobes: { a?: string, b?: string } = {}): StudyRow[] {
  const rows: StudyRow[] = [
    { label: 'Lobe A', value: `${lobes.a ?? 'lobe'} (#${input.lobeA})`, unit: '', keys: ['lobeA'] },
    { label: 'Lobe B', value: `${lobes.b ?? 'lobe'} (#${input.lobeB})`, unit: '', keys: ['lobeB'] },
    { label: 'Bulk density of A (homogeneous)', value: fmt(input.densityA), unit: 'kg m⁻³', keys: ['densityA'], testid: 'input-density-a' },
    { label: 'Bulk density of B (homogeneous)', value: fmt(input.densityB), unit: 'kg m⁻³', keys: ['densityB'], testid: 'input-density-b' },
    { label: 'Overlap and mass', value: input.massModel === 'keep-density' ? 'densities kept (overlap mass lost)' : 'total mass kept (overlap removed, density raised)', unit: '', keys: ['massModel'] },
    { label: 'Orientation of B, unit quaternion [w, x, y, z]', value: fmtVec(input.orientationB, 5), unit: '—', keys: ['orientationB'], help: 'Hamilton quaternion, scalar first: the rotation taking B’s file axes into A’s file axes.' },
    { label: 'Line of centres A → B (unit vector, A’s file axes)', value: fmtVec(input.direction, 5), unit: '—', keys: ['direction'] },
    input.orbitNormal
      ? { label: 'Orbit normal (unit vector, A’s file axes)', value: fmtVec(input.orbitNormal, 5), unit: '—', keys: ['orbitNormal'] }
      : { label: 'Orbit normal', value: 'default: A’s largest-moment axis made ⊥ to the line of centres', unit: '', keys: ['orbitNormal'] },
  ]
  const o = input.orbit
  if (o.kind === 'bound') {
    rows.push(
      { label: 'Mutual orbit', value: 'bound (a, e)', unit: '', keys: ['orbit.kind'] },
      { label: 'Semi-major axis of the mutual orbit, a', value: metresAndKm(o.semiMajorAxis), unit: 'm', keys: ['orbit.semiMajorAxis'], testid: 'input-semi-major-axis' },
      { label: 'Eccentricity of the mutual orbit, e', value: fmt(o.eccentricity, 4), unit: '—', keys: ['orbit.eccentricity'], testid: 'input-eccentricity' },
      { label: 'Pericentre a(1 − e) (from a and e)', value: metresAndKm(o.semiMajorAxis * (1 - o.eccentricity)), unit: 'm' },
    )
  }
  else {
    rows.push(
      { label: 'Mutual orbit', value: o.kind === 'parabolic' ? 'parabolic (from rest at infinity)' : 'hyperbolic', unit: '', keys: ['orbit.kind'] },
      { label: 'Pericentre q (0 = head-on)', value: metresAndKm(o.pericentre), unit: 'm', keys: ['orbit.pericentre'] },
    )
    if (o.kind === 'hyperbolic') rows.push({ label: 'Speed at infinity, v∞', value: fmt(o.vInfinity), unit: 'm s⁻¹', keys: ['orbit.vInfinity'] })
  }
  rows.push(
    spinRow('A', input.spinA as Spin),
    spinRow('B', input.spinB as Spin),
    { label: 'Settling depth after touching', value: metresAndKm(input.overlapDepth), unit: 'm', keys: ['overlapDepth'], testid: 'input-overlap-depth' },
    { label: 'Neck sweep steps (0 to ¼ of the smaller lobe’s volume-equivalent radius)', value: input.sweepSteps ? String(input.sweepSteps) : 'none', unit: '', keys: ['sweepSteps'] },
    { label: 'Observed spin period', value: input.observedSpinPeriodHours ? fmt(input.observedSpinPeriodHours) : 'not given', unit: input.observedSpinPeriodHours ? 'h' : '', keys: ['observedSpinPeriodHours'] },
  )
  const sc = input.screen
  if (sc) {
    rows.push(
      { label: 'Screen: inclination of the mutual orbit to the heliocentric plane', value: fmt(sc.inclinationDeg, 4), unit: '°', keys: ['screen.inclinationDeg'], testid: 'input-inclination' },
      { label: 'Screen: heliocentric semi-major axis', value: `${fmt(sc.heliocentricSemiMajorAxisAu)} (= ${fmt(sc.heliocentricSemiMajorAxisAu * AU_M)} m)`, unit: 'au', keys: ['screen.heliocentricSemiMajorAxisAu'], testid: 'input-heliocentric-a' },
      { label: 'Screen: heliocentric eccentricity', value: fmt(sc.heliocentricEccentricity, 4), unit: '—', keys: ['screen.heliocentricEccentricity'], testid: 'input-heliocentric-e' },
      { label: 'Screen: Kozai–Lidov prefactor K', value: sc.klPrefactor ? fmt(sc.klPrefactor, 4) : 'default, 8/(15π) (the value used is in the screen table)', unit: '—', keys: ['screen.klPrefactor'] },
    )
  }
  else {
    rows.push({ label: 'Pathway screen', value: 'not asked for', unit: '', keys: ['screen'] })
  }
  const sp = input.spread
  if (sp) {
    rows.push(
      { label: 'Spread: samples', value: String(sp.samples), unit: '', keys: ['spread.samples'] },
      { label: 'Spread: seed', value: String(sp.seed), unit: '', keys: ['spread.seed'] },
      { label: 'Spread: density of A', value: studyPriorText(sp.densityA as Prior), unit: 'kg m⁻³', keys: ['spread.densityA'], testid: 'input-spread-density-a' },
      { label: 'Spread: density of B', value: studyPriorText(sp.densityB as Prior), unit: 'kg m⁻³', keys: ['spread.densityB'], testid: 'input-spread-density-b' },
      { label: 'Spread: approach cone half-angle (uniform in solid angle)', value: fmt(sp.coneHalfAngleDeg, 4), unit: '°', keys: ['spread.coneHalfAngleDeg'] },
      { label: 'Spread: shape-scale factor (1 = as meshed)', value: studyPriorText(sp.scale as Prior), unit: '—', keys: ['spread.scale'] },
      { label: 'Spread: neck per sample', value: sp.neck === false ? 'no' : 'yes', unit: '', keys: ['spread.neck'] },
    )
  }
  else {
    rows.push({ label: 'Spread over uncertain inputs', value: 'not asked for', unit: '', keys: ['spread'] })
  }
  return rows
}

/**
 * The caution shown beside a spread row when the nominal value is off the spread's centre or outside
 * its range, else ''. The same test and wording as the record values and the "Attach" dialog
 * (`recordSpreadOffset`/`recordSpreadNote`): the quantity is read from the study result through the
 * record catalogue (`spreadKey`), and periods are shown in hours as there.
 */
export function studySpreadNote(result: unknown, spreadKey: string): string {
  const def = RECORD_QUANTITIES.find(q => q.source === 'study' && q.spreadKey === spreadKey)
  if (!def) return ''
  try {
    const q = readQuantity(def, result)
    const shown = recordDisplay(q.value, q.spread, q.unit)
    return recordSpreadNote(shown.value, shown.spread, shown.unit, v => fmt(v))
  }
  catch (e) {
    if (e instanceof QuantityReadError) return ''
    throw e
  }
}

/** The merged-body fields the neck caution reads (SI: Pa, s, m). */
export interface MergedSpinFields {
  neckStress: number | null
  spinPeriod: number | null
  separationSpinPeriod?: number | null
  breakupSpinPeriod?: number | null
  separation?: number | null
}

const hoursText = (s: number) => `${fmt(s / 3600, 4)} h`

/**
 * A caution when the merged body's spin pulls its lobes apart: the mean neck stress is tensile
 * (σ̄ > 0), or, with no neck area (point contact), the inherited spin period is shorter than the
 * lobe-separation period 2π√(d³/GM). Null when the neck is in compression or the body does not spin
 * faster than the lobes separate. The model is the one `mergedBody` uses: the two parts as point
 * masses at their centroids, the force spread evenly over the neck section.
 */
export function neckTensionCaution(m: MergedSpinFields | null | undefined): string | null {
  if (!m) return null
  const P = typeof m.spinPeriod === 'number' && m.spinPeriod > 0 ? m.spinPeriod : null
  const Psep = typeof m.separationSpinPeriod === 'number' && m.separationSpinPeriod > 0 ? m.separationSpinPeriod : null
  const faster = P !== null && Psep !== null && P < Psep
  const d = typeof m.separation === 'number' ? ` (d = ${fmt(m.separation)} m)` : ''
  const breakup = typeof m.breakupSpinPeriod === 'number'
    ? ` The strengthless-sphere breakup period (${hoursText(m.breakupSpinPeriod)}) does not describe two lobes joined at a neck and suggests a margin that is not there.`
    : ''
  const model = `Model: the two parts — lobe A with the overlap, and the rest of lobe B — as point masses at their centroids${d}, the net force spread evenly over the neck section; homogeneous parts, no stress concentration; order of magnitude only.`
  if (typeof m.neckStress === 'number' && m.neckStress > 0) {
    const spin = P !== null ? ` at the inherited spin period of ${hoursText(P)}${faster ? `, shorter than the lobe-separation period ${hoursText(Psep!)}` : ''}` : ''
    return `Neck in tension: the mean neck stress is +${fmt(m.neckStress)} Pa${spin}. The spin pulls the lobes apart harder than their mutual gravity holds them: without a cohesion (tensile strength) of at least about ${fmt(m.neckStress)} Pa across the neck, the lobes would separate at this spin.${breakup} ${model}`
  }
  if (m.neckStress === null && faster) {
    return `The inherited spin period ${hoursText(P!)} is shorter than the lobe-separation period ${hoursText(Psep!)}, and the lobes touch at a point (no neck area, so no stress figure): without cohesion at the contact they would separate at this spin. Set a settling depth to estimate the neck stress.${breakup} ${model}`
  }
  return null
}
