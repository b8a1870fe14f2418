/**
 * Every user-facing string of the 3D views, in one place so they can be reviewed together.
 * Functions take numbers already converted for display; units are part of the wording.
 */
export const VIEWER_STRINGS = {
  regionLabel: '3D view',
  placeholder: 'The 3D view starts once the page has loaded in your browser.',
  noWebgl: 'This browser cannot draw the 3D view: WebGL is switched off or not available. The numbers on this page do not depend on it; try another browser or enable hardware acceleration to see the shape.',
  rendererFailed: (message: string) => `The 3D view could not start its renderer (${message}).`,
  downloadFailed: (what: string, message: string) => `Could not load ${what}: ${message}`,
  stageDownloading: (what: string, done: string, total: string | null) => total ? `Loading ${what}: ${done} of ${total}` : `Loading ${what}: ${done}`,
  stageDecoding: (what: string) => `Reading ${what}`,
  stagePreparing: 'Preparing the surfaces',
  stageFirstFrame: 'Drawing the first frame',
  keyboardHelp: 'Drag to turn, wheel or pinch to zoom, right-drag or two fingers to shift. Keys: arrows turn, + and − zoom, 0 resets.',

  // Toolbar
  toolbarLabel: 'View controls',
  reset: 'Reset view',
  fit: 'Fit to object',
  lookAlong: 'Look along',
  viewAxis: (axis: string, sign: '+' | '−') => `${sign}${axis}`,
  viewAxisTitle: (axis: string, sign: '+' | '−', about: string) => `Look along ${sign}${axis} (${about})`,
  axisOfSmallest: 'axis of the smallest moment',
  axisOfMiddle: 'axis of the middle moment',
  axisOfLargest: 'axis of the largest moment',
  viewAxisUndefined: (title: string, equal: 'AB' | 'BC' | 'ABC') => equal === 'ABC'
    ? `${title}: not defined, all three principal moments agree (degenerate moments), so this direction is an arbitrary choice`
    : `${title}: not defined, moments ${equal[0]} and ${equal[1]} agree (degenerate moments), so this direction is an arbitrary one in their plane`,
  orbitNormalView: 'Orbit normal',
  sideView: 'Side',
  sideViewTitle: 'Look across the line of centres',
  orbitNormalTitle: 'Look down the orbit normal of the approach',
  projection: 'Projection',
  perspective: 'Perspective',
  orthographic: 'Orthographic',
  wireframe: 'Wireframe',
  turntable: 'Turntable',
  gizmo: 'Axes',
  scaleBar: 'Scale bar',
  exportPng: 'Save PNG',
  sunHeading: 'Sun',
  sunAzimuth: 'Azimuth (°)',
  sunElevation: 'Elevation (°)',
  sunFixedToBody: 'Fixed to the body (otherwise fixed to the view)',
  sunHelp: 'A low sun brings out relief on dark surfaces.',
  scaleBarNote: 'Scale bar shown in orthographic projection only.',

  // Lobe view
  colouring: 'Surface colour',
  colourPlain: 'Plain',
  colourGravity: 'Surface gravity',
  colourSlope: 'Slope',
  colourHeight: 'Geopotential height',
  fieldsNotReady: (percent: number | null) => percent === null ? 'The surface fields are not computed yet.' : `The surface fields are being computed (${percent.toFixed(0)} %).`,
  fieldsFailed: 'The surface-field job failed; colouring is unavailable.',
  fieldsCaution: 'Model estimate: homogeneous interior at the stated density, evaluated on a simplified copy of the surface (one value per face). Not a measurement.',
  legendRange: (min: string, max: string) => `${min} to ${max}`,
  unitGravity: 'm s⁻²',
  unitSlope: '°',
  unitHeight: 'm',
  colourScaleNote: 'Colour scale: viridis (perceptually uniform).',

  // Joined view
  joinedHeading: 'Contact configuration',
  showUnion: 'Show the union surface',
  showLobes: 'Show the two lobes',
  approach: 'Approach',
  approachHelp: '0 = contact; 1 = lobe B drawn back along the line of centres by twice the sum of the lobe radii.',
  approachHelpWithOffset: (metres: string) => `0 = contact; 1 = lobe B drawn back along the line of centres by twice the sum of the lobe radii. B moved back by ${metres}.`,
  markers: 'Markers',
  legendLobeA: (name: string) => `Lobe A — ${name}`,
  legendLobeB: (name: string) => `Lobe B — ${name}`,
  legendUnion: 'Union of the two lobes',
  legendContact: 'First-contact point',
  legendNeck: 'Neck outline',
  legendMergedCentroid: 'Centroid of the merged body',
  legendMergedAxes: 'Principal axes of the merged body (smallest, middle, largest moment)',
  noContact: 'The lobes never touch on this approach; they are drawn in their starting poses without contact marks.',
  studyNotDone: (status: string) => `The study ${status === 'failed' ? 'failed' : status === 'cancelled' ? 'was cancelled' : `is ${status}`}: there is nothing to draw.`,
  studyPending: (percent: number) => `The study is still running (${percent} %); the view appears once it has finished.`,
  unionMissing: 'The union surface is not available for this study.',
  contactFrameNote: 'Contact frame: lobe A’s axes, origin at lobe A’s centroid.',
} as const

/** Bytes for progress messages (SI prefixes, powers of 1000). */
export function formatBytes(n: number): string {
  if (n < 1000) return `${n} B`
  if (n < 1e6) return `${(n / 1e3).toFixed(1)} kB`
  if (n < 1e9) return `${(n / 1e6).toFixed(1)} MB`
  return `${(n / 1e9).toFixed(2)} GB`
}

/** A length in metres shown in km or m, for scale bars and offsets. */
export function formatLength(m: number): string {
  const a = Math.abs(m)
  if (a >= 1000) return `${trim(m / 1000)} km`
  if (a >= 1) return `${trim(m)} m`
  return `${trim(m * 100)} cm`
}

function trim(v: number): string {
  return Number(v.toPrecision(3)).toString()
}

/** A field value with its unit: 3 significant digits, exponent form for very small or large. */
export function formatValue(v: number, unit: string): string {
  const a = Math.abs(v)
  let s = Number(v.toPrecision(3)).toString()
  if (a !== 0 && (a < 1e-2 || a >= 1e5)) {
    const [mant, exp] = v.toExponential(2).split('e')
    s = `${mant}×10${[...String(Number(exp))].map(c => SUPERSCRIPT[c] ?? c).join('')}`
  }
  return unit === '°' ? `${s}${unit}` : `${s} ${unit}`
}

const SUPERSCRIPT: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' }
