import { z } from 'zod'
import type { ContactStudyResult } from '#shared/geometry'

const vec3 = z.tuple([z.number(), z.number(), z.number()])
const unit = (what: string) => vec3.refine(v => v.every(Number.isFinite) && Math.hypot(...v) > 1e-12, `${what} must be a non-zero vector`)
  .transform((v) => {
    const n = Math.hypot(...v)
    return [v[0] / n, v[1] / n, v[2] / n] as [number, number, number]
  })

const prior = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('fixed'), value: z.number().positive() }),
  z.object({ kind: z.literal('uniform'), min: z.number().positive(), max: z.number().positive() }).refine(p => p.max >= p.min, 'max must be ≥ min'),
  z.object({ kind: z.literal('normal'), mean: z.number().positive(), std: z.number().nonnegative() }),
])

const spin = z.union([z.literal('synchronous'), z.literal('none'), vec3.refine(v => v.every(Number.isFinite), 'spin vector must be finite (rad s⁻¹)')])

/**
 * `POST /api/studies` body. SI units: metres, m s⁻¹, kg m⁻³, rad s⁻¹. Vectors are in lobe A's file
 * axes. `direction` and `orbitNormal` are normalised here; `orientationB` is a Hamilton unit
 * quaternion [w, x, y, z] (scalar first), the active rotation taking B's file axes into A's frame.
 */
export const studyInputSchema = z.object({
  title: z.string().trim().max(160).optional(),
  lobeA: z.number({ message: 'Choose lobe A' }).int().positive(),
  lobeB: z.number({ message: 'Choose lobe B' }).int().positive(),
  densityA: z.number().min(1).max(10_000).optional(),
  densityB: z.number().min(1).max(10_000).optional(),
  massModel: z.enum(['conserve-mass', 'keep-density']).default('conserve-mass'),
  orientationB: z.tuple([z.number(), z.number(), z.number(), z.number()])
    .refine(q => q.every(Number.isFinite) && Math.hypot(...q) > 1e-12, 'orientationB must be a non-zero quaternion [w, x, y, z]')
    .transform((q) => {
      const n = Math.hypot(...q)
      return q.map(c => c / n) as [number, number, number, number]
    })
    .default([1, 0, 0, 0]),
  direction: unit('direction'),
  orbitNormal: unit('orbitNormal').optional(),
  orbit: z.discriminatedUnion('kind', [
    z.object({ kind: z.literal('bound'), semiMajorAxis: z.number().positive(), eccentricity: z.number().min(0).lt(1) }),
    z.object({ kind: z.literal('parabolic'), pericentre: z.number().min(0).default(0) }),
    z.object({ kind: z.literal('hyperbolic'), vInfinity: z.number().positive(), pericentre: z.number().min(0).default(0) }),
  ]),
  spinA: spin.default('synchronous'),
  spinB: spin.default('synchronous'),
  overlapDepth: z.number().min(0).default(0),
  sweepSteps: z.number().int().min(0).max(24).default(4),
  observedSpinPeriodHours: z.number().positive().optional(),
  screen: z.object({
    inclinationDeg: z.number().min(0).max(180),
    heliocentricSemiMajorAxisAu: z.number().positive(),
    heliocentricEccentricity: z.number().min(0).lt(1).default(0),
    klPrefactor: z.number().positive().optional(),
  }).optional(),
  spread: z.object({
    seed: z.number().int().min(0).max(2 ** 31 - 1),
    samples: z.number().int().min(2).max(1000),
    densityA: prior,
    densityB: prior,
    coneHalfAngleDeg: z.number().min(0).max(90),
    scale: prior,
    neck: z.boolean().default(true),
  }).optional(),
}).superRefine((v, ctx) => {
  // A lobe cannot meet itself: the first contact, neck and merged body of one mesh with its own copy
  // in the same place are meaningless (two copies of a mesh uploaded as two lobes are accepted).
  if (v.lobeA === v.lobeB) {
    ctx.addIssue({ code: 'custom', path: ['lobeB'], message: 'lobe B must be a different lobe from lobe A: a lobe cannot be studied against itself' })
  }
  if (v.orbitNormal && Math.abs(v.orbitNormal[0] * v.direction[0] + v.orbitNormal[1] * v.direction[1] + v.orbitNormal[2] * v.direction[2]) > 1e-6) {
    ctx.addIssue({ code: 'custom', path: ['orbitNormal'], message: 'orbitNormal must be perpendicular to direction' })
  }
  // The pathway screen works on the bound mutual orbit (its semi-major axis and eccentricity).
  if (v.screen && v.orbit.kind !== 'bound') {
    ctx.addIssue({ code: 'custom', path: ['screen'], message: `the pathway screen needs a bound orbit (orbit.kind 'bound'), not '${v.orbit.kind}'; leave screen out` })
  }
})

export type StudyInput = z.infer<typeof studyInputSchema>

/** A study's input as stored: the densities filled in from the lobes when the request left them out. */
export type StoredStudyInput = StudyInput & { densityA: number, densityB: number }

/** A finished study's result as stored and served (SI units, contact frame); the union mesh is a file. */
export type StudyResult = Omit<ContactStudyResult, 'unionMesh'> & { unionStored: boolean }

/** `POST /api/studies/:id/merged-lobe` body: the new lobe's name (default: both lobes' names and the study). */
export const mergedLobeSchema = z.object({ name: z.string().trim().min(1).max(120).optional() })

export const studyListQuerySchema = z.object({
  lobe: z.coerce.number().int().positive().optional(),
  pairA: z.coerce.number().int().positive().optional(),
  pairB: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1).max(200).default(25),
  offset: z.coerce.number().int().min(0).default(0),
})

export const AU_M = 149_597_870_700

/** Factors of the default spread density range: from 0.6 × the lower to 1.4 × the higher lobe density. */
export const SPREAD_DENSITY_BAND = { low: 0.6, high: 1.4 } as const

/** `x` (kg m⁻³) rounded down (`dir` −1) or up (+1) to a step of 10 kg m⁻³, finer below 100 (two significant digits at least). */
function roundDensity(x: number, dir: -1 | 1): number {
  const step = Math.min(10, 10 ** (Math.floor(Math.log10(x)) - 1))
  const n = dir < 0 ? Math.floor(x / step + 1e-9) : Math.ceil(x / step - 1e-9)
  return Number((n * step).toPrecision(12))
}

/**
 * The new-study form's default density range for the spread, kg m⁻³: a band around the lobes'
 * densities, from 0.6 × the lower to 1.4 × the higher, rounded outward to 10 kg m⁻³ (finer below
 * 100 kg m⁻³), so that the range always contains both nominal densities (e.g. 1500 and 1500 →
 * 900–2100). Null when either density is not a positive number.
 */
export function defaultSpreadDensityRange(densityA: number, densityB: number): { min: number, max: number } | null {
  if (!(densityA > 0) || !(densityB > 0) || !Number.isFinite(densityA) || !Number.isFinite(densityB)) return null
  return {
    min: roundDensity(SPREAD_DENSITY_BAND.low * Math.min(densityA, densityB), -1),
    max: roundDensity(SPREAD_DENSITY_BAND.high * Math.max(densityA, densityB), 1),
  }
}
