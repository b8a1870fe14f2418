/**
 * Warnings the server adds to an uploaded lobe's own validation report, for things the mesh alone
 * cannot tell: a size no body of the field has (wrong units?), and the same file uploaded before.
 * Pure functions: the ingest calls them, the unit tests check them.
 */

/**
 * Plausible volume-equivalent radii of the bodies Isthmus is for, metres: from boulder-sized
 * near-Earth objects (~1 m) to the largest bilobed bodies of the outer Solar System (a few hundred
 * km). Outside it the coordinate units are the likelier explanation. Common practice, no source.
 */
export const SIZE_CHECK_MIN_RADIUS_M = 1
export const SIZE_CHECK_MAX_RADIUS_M = 300_000

export interface LobeWarning { code: string, message: string }

/** A length for people: "1 200 km", "350 m", "4.2 cm" (3 significant digits, thin groups of 3). */
export function lengthText(metres: number): string {
  const a = Math.abs(metres)
  const [value, unit] = a >= 1000 ? [metres / 1000, 'km'] : a >= 1 ? [metres, 'm'] : a >= 0.01 ? [metres * 100, 'cm'] : [metres * 1000, 'mm']
  const rounded = Number(value.toPrecision(3))
  const [int, frac] = String(Math.abs(rounded) >= 1e21 ? rounded.toExponential(2) : rounded).split('.')
  const grouped = int!.replace(/\B(?=(\d{3})+(?!\d))/g, ' ')
  return `${grouped}${frac ? `.${frac}` : ''} ${unit}`
}

/**
 * 'size-check' warning when the volume-equivalent radius lies outside
 * [SIZE_CHECK_MIN_RADIUS_M, SIZE_CHECK_MAX_RADIUS_M], suggesting the likelier units; null inside.
 * @param equivalentRadiusM volume-equivalent radius after the unit conversion, m
 * @param units the units the file was read in
 */
export function sizeCheckWarning(equivalentRadiusM: number, units: 'm' | 'km'): LobeWarning | null {
  if (!Number.isFinite(equivalentRadiusM) || equivalentRadiusM <= 0) return null
  const tooLarge = equivalentRadiusM > SIZE_CHECK_MAX_RADIUS_M
  const tooSmall = equivalentRadiusM < SIZE_CHECK_MIN_RADIUS_M
  if (!tooLarge && !tooSmall) return null
  const across = lengthText(2 * equivalentRadiusM)
  const read = units === 'km' ? 'kilometres' : 'metres'
  const question = tooLarge
    ? (units === 'km' ? 'were the coordinates in metres?' : 'were the coordinates in millimetres or centimetres? Isthmus reads metres or kilometres, so rescale the file.')
    : (units === 'm' ? 'were the coordinates in kilometres?' : 'is the model scaled to unit size? Scale it to the body’s real size.')
  const range = `volume-equivalent radii from ${lengthText(SIZE_CHECK_MIN_RADIUS_M)} to ${lengthText(SIZE_CHECK_MAX_RADIUS_M)}`
  return {
    code: 'size-check',
    message: `With the coordinates read in ${read}, the body is ${across} across (volume-equivalent diameter): ${question} The bodies this tool is meant for have ${range}; this one's is ${lengthText(equivalentRadiusM)}. Every length, volume and mass here depends on the units: if they are wrong, upload the file again with the right ones.`,
  }
}

/**
 * 'same-file' warning naming the earlier lobes made from the same file (same sha256), or null
 * when there are none. Lobes read in the other units are named separately: one of the two
 * readings has the wrong size.
 */
export function sameFileWarning(earlier: { id: number, name: string, units: 'm' | 'km' }[], units: 'm' | 'km'): LobeWarning | null {
  if (!earlier.length) return null
  const list = (ls: typeof earlier) => ls.map(l => `#${l.id} '${l.name}'`).join(', ')
  const same = earlier.filter(l => l.units === units)
  const other = earlier.filter(l => l.units !== units)
  const parts: string[] = []
  if (same.length) parts.push(`This is the same file as lobe${same.length > 1 ? 's' : ''} ${list(same)}, read in the same units: a second lobe was made (e.g. for another density); check that you meant it.`)
  if (other.length) parts.push(`The same file was read in ${units === 'km' ? 'metres' : 'kilometres'} as lobe${other.length > 1 ? 's' : ''} ${list(other)}: the two readings differ 1 000× in size, and at most one of them is right.`)
  return { code: 'same-file', message: parts.join(' ') }
}
