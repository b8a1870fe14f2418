/**
 * How a lobe's values are shown to people where float64 round-off would otherwise pass for a
 * result: coefficients of a symmetric body that are 0 up to round-off, slopes that are 0 up to the
 * rounding of a cosine, principal axes that equal moments leave undefined. Display only: the API
 * and the exports keep the raw values.
 */
import { fmt } from './format'

/**
 * Two principal moments closer than this, relative to the largest moment, are taken as equal
 * (degenerate): float64 sums leave ~1e-15 relative differences between moments that are equal by
 * the mesh's symmetry, and axes picked out by a difference that small mean nothing. Common
 * practice, no source.
 */
export const MOMENT_DEGENERACY_REL = 1e-9

/**
 * Dimensionless gravity coefficients (J2, C22 and their normalised forms) below this magnitude are
 * round-off: a coefficient that is 0 by the mesh's symmetry comes out at ~1e-16. Common practice,
 * no source.
 */
export const COEFFICIENT_ROUND_OFF = 1e-12

/**
 * Slopes below this, degrees, are round-off: the slope is the arccosine of a cosine, and a cosine
 * a few float64 units below 1 already gives ~1e-6° (acos(1 − 2⁻⁵³) = 8.5×10⁻⁷°). Common practice,
 * no source.
 */
export const SLOPE_ROUND_OFF_DEG = 1e-4

/** Property-table keys of the dimensionless coefficients judged against COEFFICIENT_ROUND_OFF. */
export const COEFFICIENT_KEYS = ['J2', 'C22', 'C20Normalized', 'C22Normalized'] as const

export interface MomentDegeneracy {
  /** Per principal axis A, B, C: false where equal moments leave it undefined. */
  defined: [boolean, boolean, boolean]
  /** Which moments agree: 'AB', 'BC' or 'ABC'; null when all three differ. */
  equal: 'AB' | 'BC' | 'ABC' | null
  /** A sentence for people (states the tolerance), or null. */
  note: string | null
}

/**
 * Which principal axes are defined, given the moments A ≤ B ≤ C (kg m²). Moments within
 * MOMENT_DEGENERACY_REL × C of each other are equal, and the axes in their plane are not defined.
 */
export function momentDegeneracy(moments: readonly number[] | null | undefined): MomentDegeneracy {
  const none: MomentDegeneracy = { defined: [true, true, true], equal: null, note: null }
  if (!moments || moments.length !== 3 || !moments.every(m => Number.isFinite(m))) return none
  const [A, B, C] = moments as [number, number, number]
  const tol = MOMENT_DEGENERACY_REL * Math.max(Math.abs(A), Math.abs(B), Math.abs(C))
  const ab = Math.abs(B - A) <= tol
  const bc = Math.abs(C - B) <= tol
  const rel = 'to a relative 10⁻⁹ (degenerate moments)'
  if (ab && bc) {
    return { defined: [false, false, false], equal: 'ABC', note: `All three principal moments agree ${rel}: no principal axes are defined. Any three perpendicular directions are principal; the computed ones (shown on hover) are an arbitrary choice.` }
  }
  if (ab) {
    return { defined: [false, false, true], equal: 'AB', note: `Moments A and B agree ${rel}: the A and B axes are not defined. Any two perpendicular directions in the plane normal to the C axis are principal; only the C axis is defined.` }
  }
  if (bc) {
    return { defined: [true, false, false], equal: 'BC', note: `Moments B and C agree ${rel}: the B and C axes are not defined. Any two perpendicular directions in the plane normal to the A axis are principal; only the A axis is defined.` }
  }
  return none
}

/** A cell of the property table: the text shown and, when it differs from the value, a hover title. */
export interface Cell { text: string, title?: string, roundOff?: boolean }

/** A dimensionless coefficient: "0 (round-off)" below COEFFICIENT_ROUND_OFF, the raw value on hover. */
export function coefficientCell(value: unknown, digits = 5): Cell {
  if (typeof value === 'number' && value !== 0 && Math.abs(value) < COEFFICIENT_ROUND_OFF) {
    return { text: '0 (round-off)', roundOff: true, title: `Computed ${fmt(value, digits)}: below the round-off threshold of 10⁻¹² in magnitude, so 0 within float64 precision. Exports and the API keep the computed value.` }
  }
  return { text: fmt(value, digits) }
}

/** A slope range { min, max, mean } in degrees: members below SLOPE_ROUND_OFF_DEG show as 0. */
export function slopeCell(value: unknown, digits = 5): Cell {
  const r = value as { min?: number, max?: number, mean?: number } | null
  if (!r || typeof r.mean !== 'number') return { text: '—' }
  const members = [r.mean, r.min, r.max] as number[]
  const cut = members.some(x => typeof x === 'number' && x !== 0 && Math.abs(x) < SLOPE_ROUND_OFF_DEG)
  const show = (x: number | undefined) => (typeof x === 'number' && Math.abs(x) < SLOPE_ROUND_OFF_DEG ? '0' : fmt(x, digits))
  const text = `${show(r.mean)} (${show(r.min)} – ${show(r.max)})`
  if (!cut) return { text }
  return {
    text: `${text} (round-off)`,
    roundOff: true,
    title: `Computed ${fmt(r.mean, digits)} (${fmt(r.min, digits)} – ${fmt(r.max, digits)})°: values below 10⁻⁴° are round-off of the arccosine and shown as 0. Exports and the API keep the computed values.`,
  }
}

/** Number of separate bodies in a lobe's mesh (1 unless the 'multiple-components' warning is there). */
export function bodyCount(lobe: { warnings?: { code: string, message: string }[] | null, report?: { components?: unknown } | null, properties?: { components?: unknown } | null }): number {
  if (!lobe.warnings?.some(w => w.code === 'multiple-components')) return 1
  if (typeof lobe.report?.components === 'number') return lobe.report.components
  if (Array.isArray(lobe.properties?.components)) return lobe.properties.components.length
  const m = lobe.warnings.find(w => w.code === 'multiple-components')!.message.match(/(\d+) separate/)
  return m ? Number(m[1]) : 2
}
