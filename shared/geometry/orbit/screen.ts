/**
 * Pathway screen for a close binary under the Sun's tide (docs/pathway-screen.md). A SCREEN from classic
 * published formulas — quadrupole, test-particle Kozai–Lidov from e0 ≈ 0, secular J2 precession
 * for an equatorial orbit — not an integration: it says whether a path toward contact is plausible,
 * not that it happens. It also says whether the present orbit's pericentre is already within
 * contact, in which case no cycles are needed.
 */
import { GeometryError } from '../types'
import { G } from '../mass/mass'

/** Nominal solar GM, m³ s⁻² (IAU 2015 B3). */
export const GM_SUN = 1.3271244e20
/** Astronomical unit, m (IAU 2012 B2). */
export const AU = 149_597_870_700
/** Default Kozai–Lidov timescale prefactor 8/(15π) (Antognini 2015, MNRAS 452, 3610). */
export const KL_PREFACTOR_ANTOGNINI = 8 / (15 * Math.PI)
/** Alternative prefactor 2/(3π) (Kiseleva, Eggleton & Mikkola 1998 [mem]). */
export const KL_PREFACTOR_KEM = 2 / (3 * Math.PI)

export interface ScreenInput {
  /** Mutual (binary) orbit semi-major axis, m, and eccentricity. */
  semiMajorAxis: number
  eccentricity: number
  /** Inclination of the mutual orbit to the heliocentric orbital plane, deg. */
  inclinationDeg: number
  /** Heliocentric semi-major axis, m, and eccentricity (default 0). */
  heliocentricSemiMajorAxis: number
  heliocentricEccentricity?: number
  /** Lobe masses, kg. */
  massA: number
  massB: number
  /** Each lobe's own J2 (normalised to its own mass and reference radius) and that radius, m. */
  J2A: number
  referenceRadiusA: number
  J2B: number
  referenceRadiusB: number
  /** Contact separation d, m (for "can the minimum pericentre reach contact"). */
  contactSeparation: number
  /** Kozai–Lidov timescale prefactor K (default 8/(15π)). */
  klPrefactor?: number
}

export interface PathwayScreen {
  kind: 'screen'
  /** Hill radius a_hel (m/(3M☉))^{1/3}, m, and at perihelion a_hel(1−e_hel)(…)^{1/3}. */
  hillRadius: number
  hillRadiusAtPerihelion: number
  /** a / r_H (dimensionless). */
  aOverHill: number
  /** Inside the Kozai–Lidov window 39.23° < i < 140.77° (cos² i < 3/5). */
  inKozaiWindow: boolean
  /** Quadrupole test-particle e_max = √(1 − (5/3)cos² i) from e0 ≈ 0 (0 outside the window). */
  eMax: number
  /** Pericentre of the present mutual orbit a(1 − e), m, and whether it is already within contact. */
  currentPericentre: number
  currentPericentreReachesContact: boolean
  /**
   * a(1 − max(e, e_max)), m: the closer of the present pericentre and the one the cycles could
   * bring (the cycles cannot undo what the present orbit already reaches), and whether it is
   * within the contact separation.
   */
  minimumPericentre: number
  minimumPericentreReachesContact: boolean
  /** t_KL = K (P_out²/P_in)(M_in+m3)/m3 (1−e_out²)^{3/2}, s, with K reported. */
  kozaiTimescale: number
  klPrefactor: number
  /** Inner and outer periods, s. */
  innerPeriod: number
  outerPeriod: number
  /** Secular apsidal rates from each lobe's J2 and their sum, rad/s: (3/2) n J2 (R/a)² (1−e²)⁻². */
  j2PrecessionRateA: number
  j2PrecessionRateB: number
  j2PrecessionRate: number
  /** ϖ̇_J2 · t_KL; ≳ 1 means J2 precession quenches the cycles. */
  quenchParameter: number
  j2QuenchesKozai: boolean
  /**
   * The screen's conclusion: 'outside-window' (no Kozai–Lidov cycles at this inclination),
   * 'quenched' (in the window, but ϖ̇·t_KL ≥ 1: J2 precession suppresses the cycles), or
   * 'not-quenched' (cycles can grow e toward e_max; `minimumPericentreReachesContact` then says
   * whether they could bring the lobes into contact).
   */
  verdict: 'outside-window' | 'quenched' | 'not-quenched'
  caveats: string
}

/** The pathway screen. @throws GeometryError('bad-input') for non-physical input. */
export function pathwayScreen(s: ScreenInput): PathwayScreen {
  const bad = (path: string, m: string) => new GeometryError('bad-input', `pathwayScreen: ${path} ${m}`, [{ path, message: m }])
  for (const k of ['semiMajorAxis', 'heliocentricSemiMajorAxis', 'massA', 'massB', 'referenceRadiusA', 'referenceRadiusB', 'contactSeparation'] as const) {
    if (!(s[k] > 0) || !Number.isFinite(s[k])) throw bad(k, 'must be positive')
  }
  if (!(s.eccentricity >= 0 && s.eccentricity < 1)) throw bad('eccentricity', 'must be in [0, 1)')
  const eh = s.heliocentricEccentricity ?? 0
  if (!(eh >= 0 && eh < 1)) throw bad('heliocentricEccentricity', 'must be in [0, 1)')
  const m = s.massA + s.massB
  const GMin = G * m
  const a = s.semiMajorAxis
  const e = s.eccentricity
  const ah = s.heliocentricSemiMajorAxis
  const mSun = GM_SUN / G
  const hill = ah * Math.cbrt(m / (3 * mSun))
  const cosI = Math.cos(s.inclinationDeg * Math.PI / 180)
  const inWindow = cosI * cosI < 3 / 5
  const eMax = inWindow ? Math.sqrt(1 - (5 / 3) * cosI * cosI) : 0
  const K = s.klPrefactor ?? KL_PREFACTOR_ANTOGNINI
  const Pin = 2 * Math.PI * Math.sqrt(a ** 3 / GMin)
  const Pout = 2 * Math.PI * Math.sqrt(ah ** 3 / (GM_SUN + GMin))
  const tKL = K * (Pout * Pout / Pin) * ((GMin + GM_SUN) / GM_SUN) * (1 - eh * eh) ** 1.5
  const n = Math.sqrt(GMin / a ** 3)
  const rate = (J2: number, R: number) => 1.5 * n * J2 * (R / a) ** 2 / (1 - e * e) ** 2
  const wA = rate(s.J2A, s.referenceRadiusA)
  const wB = rate(s.J2B, s.referenceRadiusB)
  const quench = (wA + wB) * tKL
  const q = a * (1 - e)
  const qMin = a * (1 - Math.max(e, eMax))
  return {
    kind: 'screen',
    hillRadius: hill,
    hillRadiusAtPerihelion: hill * (1 - eh),
    aOverHill: a / hill,
    inKozaiWindow: inWindow,
    eMax,
    currentPericentre: q,
    currentPericentreReachesContact: q <= s.contactSeparation,
    minimumPericentre: qMin,
    minimumPericentreReachesContact: qMin <= s.contactSeparation,
    kozaiTimescale: tKL,
    klPrefactor: K,
    innerPeriod: Pin,
    outerPeriod: Pout,
    j2PrecessionRateA: wA,
    j2PrecessionRateB: wB,
    j2PrecessionRate: wA + wB,
    quenchParameter: quench,
    j2QuenchesKozai: quench >= 1,
    verdict: !inWindow ? 'outside-window' : quench >= 1 ? 'quenched' : 'not-quenched',
    caveats: 'Screen only: quadrupole test-particle Kozai–Lidov from e0≈0 (no octupole, no tides, no '
      + 'YORP/BYORP); J2 rates for an equatorial orbit with each lobe\'s own J2 and radius; '
      + 'quenching judged by ϖ̇·t_KL ≳ 1 (order of magnitude).'
      + (e > 0.1 ? ` The present orbit is eccentric (e = ${e.toFixed(2)}): e_max assumes a near-circular start; from this e the reachable e_max depends on the argument of pericentre, which the screen does not model.` : ''),
  }
}
