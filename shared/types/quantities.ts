/**
 * The catalogue of quantities that can be attached to an object record: where each is read from a
 * lobe row (`properties`, the mass properties at the lobe's density, SI; `surface`, the surface-field
 * summary) or a study row (`result`), its unit, and whether it only means something together with a
 * reference radius (gravity coefficients C_lm ∝ R^−l).
 *
 * Pure TypeScript: used by the attach dialog, the handlers and the unit tests.
 */

/**
 * What a value describes. `lobe-pair` is the two lobes on their approach (contact speed, escape
 * speeds, impact angles, mass ratio): a property of the encounter, not of any one body. Values stored
 * before that subject existed were moved to it by migration 0005 (subject and supersede group together).
 */
export const RECORD_SUBJECTS = ['lobe-a', 'lobe-b', 'whole-body', 'merged-body', 'lobe-pair'] as const
export type RecordSubject = (typeof RECORD_SUBJECTS)[number]
export const RECORD_SUBJECT_LABELS: Record<RecordSubject, string> = {
  'lobe-a': 'lobe A',
  'lobe-b': 'lobe B',
  'whole-body': 'whole body',
  'merged-body': 'merged body',
  'lobe-pair': 'lobe pair (approach)',
}
/** Subjects only a study can give (a single lobe never stands for them). */
export const STUDY_ONLY_SUBJECTS = ['merged-body', 'lobe-pair'] as const satisfies readonly RecordSubject[]
/** Quantities that describe the pair on its approach (subject `lobe-pair`). */
export const PAIR_QUANTITY_KEYS = [
  'contact.speed', 'contact.escapeSpeed', 'contact.speedFullShape', 'contact.escapeSpeedFullShape', 'contact.speedRatio',
  'contact.impactAngleFromNormalDeg', 'contact.impactAngleFromTangentDeg', 'contact.normalSpeed', 'contact.massRatio',
] as const

export type QuantitySource = 'lobe' | 'study'
/** A scalar, or a fixed-length vector such as principal moments [A, B, C]. */
export type QuantityValue = number | number[]

export interface QuantityDef {
  /** Stable key stored with every attachment; never renamed. */
  key: string
  source: QuantitySource
  label: string
  /** SI unit as printed ('1' = dimensionless). */
  unit: string
  /** Path inside the lobe row (`properties.…`, `surface.…`) or the study `result`. */
  path: string[]
  /** 'vector' quantities carry `components` labels. */
  shape: 'scalar' | 'vector'
  components?: string[]
  /** Path to the reference radius (m) that goes with the value, same root as `path`. */
  referenceRadiusPath?: string[]
  /** Study quantities describe a fixed subject; lobe quantities take the subject chosen when attaching. */
  subject?: RecordSubject
  /**
   * For a `{ min, max, mean }` summary (surface fields): the mean is the value and [min, max] is kept
   * as its spread, labelled as a range over the surface, not an uncertainty.
   */
  summary?: 'mean-with-range'
  /** Entry of a study's `result.spread` summary ({ min, median, max, mean, std, n }) that belongs to this quantity. */
  spreadKey?: string
  note?: string
}

const lobe = (key: string, label: string, unit: string, extra: Partial<QuantityDef> = {}): QuantityDef =>
  ({ key, source: 'lobe', label, unit, path: ['properties', key], shape: 'scalar', ...extra })
const study = (key: string, label: string, unit: string, subject: RecordSubject, extra: Partial<QuantityDef> = {}): QuantityDef =>
  ({ key, source: 'study', label, unit, path: key.split('.'), shape: 'scalar', subject, ...extra })

const ABC = ['A', 'B', 'C']
const SEMI = ['a', 'b', 'c']

export const RECORD_QUANTITIES: readonly QuantityDef[] = [
  // Lobe mass properties (at the lobe's stated density, homogeneous interior).
  lobe('volume', 'Volume', 'm³'),
  lobe('mass', 'Mass', 'kg', { note: 'scales with the assumed bulk density' }),
  lobe('density', 'Bulk density (assumed)', 'kg m⁻³', { note: 'an input of the lobe, not a derived value' }),
  lobe('surfaceArea', 'Surface area', 'm²'),
  lobe('equivalentRadius', 'Volume-equivalent radius', 'm'),
  lobe('maxRadius', 'Largest centroid-to-vertex distance', 'm'),
  lobe('principalMoments', 'Principal moments of inertia', 'kg m²', { shape: 'vector', components: ABC }),
  lobe('deeveSemiAxes', 'DEEVE semi-axes', 'm', { shape: 'vector', components: SEMI }),
  lobe('ellipsoidSemiAxes', 'Moment-equivalent ellipsoid semi-axes', 'm', { shape: 'vector', components: SEMI }),
  lobe('J2', 'J2 (unnormalised, principal frame)', '1', { referenceRadiusPath: ['properties', 'referenceRadius'] }),
  lobe('C22', 'C22 (unnormalised, principal frame)', '1', { referenceRadiusPath: ['properties', 'referenceRadius'] }),
  lobe('C20Normalized', 'C̄20 (4π-normalised)', '1', { referenceRadiusPath: ['properties', 'referenceRadius'] }),
  lobe('C22Normalized', 'C̄22 (4π-normalised)', '1', { referenceRadiusPath: ['properties', 'referenceRadius'] }),
  lobe('escapeSpeedPointMass', 'Escape speed, point-mass estimate', 'm s⁻¹', { note: 'ignores shape and spin' }),
  lobe('escapeSpeedSurface', 'Surface escape speed (mean over the surface)', 'm s⁻¹', { path: ['surface', 'escapeSpeedSurface'], summary: 'mean-with-range' }),
  lobe('surfaceGravity', 'Surface gravity (mean over the surface)', 'm s⁻²', { path: ['surface', 'surfaceGravity'], summary: 'mean-with-range' }),
  lobe('slopeDeg', 'Surface slope (mean over the surface)', 'deg', { path: ['surface', 'slopeDeg'], summary: 'mean-with-range' }),

  // Contact study: kinematics of the approach (the lobe pair), then the neck of the joined body.
  study('contact.speed', 'Contact speed', 'm s⁻¹', 'lobe-pair', { spreadKey: 'speed' }),
  study('contact.escapeSpeed', 'Mutual escape speed at contact', 'm s⁻¹', 'lobe-pair', { spreadKey: 'escapeSpeed' }),
  study('contact.speedFullShape', 'Contact speed with the full-shape attraction', 'm s⁻¹', 'lobe-pair'),
  study('contact.escapeSpeedFullShape', 'Mutual escape speed with the full-shape attraction', 'm s⁻¹', 'lobe-pair'),
  study('contact.speedRatio', 'Contact speed / mutual escape speed', '1', 'lobe-pair'),
  study('contact.impactAngleFromNormalDeg', 'Impact angle from the contact normal', 'deg', 'lobe-pair'),
  study('contact.impactAngleFromTangentDeg', 'Impact angle from the tangent plane', 'deg', 'lobe-pair'),
  study('contact.normalSpeed', 'Speed along the contact normal', 'm s⁻¹', 'lobe-pair'),
  study('contact.massRatio', 'Mass ratio (smaller / larger)', '1', 'lobe-pair'),
  study('neck.equivalentRadius', 'Neck equivalent radius', 'm', 'whole-body', { spreadKey: 'neckRadius' }),
  study('neck.area', 'Neck section area', 'm²', 'whole-body'),
  study('neck.overlapVolume', 'Overlap volume', 'm³', 'whole-body'),
  // Merged body.
  study('merged.mass', 'Merged mass', 'kg', 'merged-body'),
  study('merged.volume', 'Merged volume', 'm³', 'merged-body'),
  study('merged.density', 'Merged bulk density', 'kg m⁻³', 'merged-body'),
  study('merged.principalMoments', 'Merged principal moments of inertia', 'kg m²', 'merged-body', { shape: 'vector', components: ABC }),
  study('merged.J2', 'Merged J2 (unnormalised)', '1', 'merged-body', { referenceRadiusPath: ['merged', 'referenceRadius'], spreadKey: 'mergedJ2' }),
  study('merged.C22', 'Merged C22 (unnormalised)', '1', 'merged-body', { referenceRadiusPath: ['merged', 'referenceRadius'] }),
  study('merged.spinPeriod', 'Inherited spin period', 's', 'merged-body', { spreadKey: 'spinPeriod' }),
  study('merged.relaxedSpinPeriod', 'Spin period after relaxing to the largest-moment axis', 's', 'merged-body'),
  study('merged.breakupSpinPeriod', 'Breakup spin period (strengthless sphere)', 's', 'merged-body'),
  study('merged.tumbleAngleDeg', 'Tumble angle', 'deg', 'merged-body'),
  study('merged.neckStress', 'Mean neck stress (order of magnitude)', 'Pa', 'merged-body'),
]

const BY_KEY = new Map(RECORD_QUANTITIES.map(q => [q.key, q]))

export function quantityDef(key: string): QuantityDef | undefined {
  return BY_KEY.get(key)
}

export function quantitiesFor(source: QuantitySource): QuantityDef[] {
  return RECORD_QUANTITIES.filter(q => q.source === source)
}

/** Numeric spread kept with a value: the isFiniteNumber numeric fields of the source (e.g. { min, max } or { sd }), and what they mean. */
export interface QuantitySpread {
  basis: 'surface-range' | 'study-spread'
  [field: string]: number | string
}

export interface ReadQuantity {
  key: string
  value: QuantityValue
  unit: string
  spread: QuantitySpread | null
  /** m, or null when the quantity carries none. */
  referenceRadius: number | null
}

export class QuantityReadError extends Error {
  constructor(readonly key: string, message: string) {
    super(message)
  }
}

function quantityAt(root: unknown, path: string[]): unknown {
  let v: unknown = root
  for (const p of path) {
    if (v === null || typeof v !== 'object') return undefined
    v = (v as Record<string, unknown>)[p]
  }
  return v
}

const isFiniteNumber = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v)

function numericFieldsOf(o: unknown): Record<string, number> | null {
  if (!o || typeof o !== 'object' || Array.isArray(o)) return null
  const out: Record<string, number> = {}
  for (const [k, v] of Object.entries(o)) if (isFiniteNumber(v)) out[k] = v
  return Object.keys(out).length ? out : null
}

/**
 * Reads one catalogue quantity from its source, exactly as stored (no rounding).
 * @param source a lobe row `{ properties, surface }` or a study `result`
 * @throws QuantityReadError when the quantity is absent or not isFiniteNumber (e.g. no contact, surface job not done)
 */
export function readQuantity(def: QuantityDef, source: unknown): ReadQuantity {
  const raw = quantityAt(source, def.path)
  let value: QuantityValue
  let spread: QuantitySpread | null = null
  if (def.summary === 'mean-with-range') {
    const s = numericFieldsOf(raw)
    if (!s || !isFiniteNumber(s.mean)) throw new QuantityReadError(def.key, `${def.label} is not available (surface fields not computed yet)`)
    value = s.mean
    if (isFiniteNumber(s.min) && isFiniteNumber(s.max)) spread = { basis: 'surface-range', min: s.min, max: s.max }
  }
  else if (def.shape === 'vector') {
    if (!Array.isArray(raw) || raw.length !== (def.components?.length ?? raw.length) || !raw.every(isFiniteNumber)) {
      throw new QuantityReadError(def.key, `${def.label} is not available in this source`)
    }
    value = [...raw]
  }
  else {
    if (!isFiniteNumber(raw)) throw new QuantityReadError(def.key, `${def.label} is not available in this source`)
    value = raw
  }
  if (def.source === 'study') {
    // A study's spread summary (sampled inputs) has one entry per summarised quantity, plus how it was drawn.
    const entry = (def.spreadKey ? numericFieldsOf(quantityAt(source, ['spread', def.spreadKey])) : null)
      ?? numericFieldsOf(quantityAt(source, ['spread', def.key])) ?? numericFieldsOf(quantityAt(source, ['spread', ...def.path]))
    if (entry) {
      spread = { basis: 'study-spread', ...entry }
      const root = quantityAt(source, ['spread']) as Record<string, unknown>
      for (const k of ['samples', 'seed', 'priors']) {
        const v = root[k]
        if (isFiniteNumber(v) || typeof v === 'string') spread[k] = v
      }
    }
  }
  let referenceRadius: number | null = null
  if (def.referenceRadiusPath) {
    const r = quantityAt(source, def.referenceRadiusPath)
    if (!isFiniteNumber(r) || r <= 0) throw new QuantityReadError(def.key, `${def.label} has no reference radius in this source`)
    referenceRadius = r
  }
  return { key: def.key, value, unit: def.unit, spread, referenceRadius }
}

/**
 * The supersede group of an attachment: values of the same quantity for the same subject and the
 * same reference radius replace each other when accepted. The radius is written with JavaScript's
 * shortest round-trip form, so equal float64 radii give equal keys and different ones never collide.
 */
export function supersedeGroup(key: string, subject: RecordSubject, referenceRadius: number | null): string {
  return `${key}|${subject}|${referenceRadius === null ? '' : String(referenceRadius)}`
}
