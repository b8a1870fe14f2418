/**
 * Colours of the 3D views. Bodies and marks use the Okabe–Ito set (Okabe & Ito 2008, "Color
 * Universal Design"), chosen because its members stay distinct under the common colour-vision
 * deficiencies: lobe A orange and lobe B sky blue differ in hue and in lightness, so they separate
 * for protan, deutan and tritan viewers and in greyscale print.
 */
export const VIEWER_COLOURS = {
  background: '#0e1014', // basalt-950
  lobe: '#c9c4bc', // single lobe: a neutral light regolith grey
  lobeA: '#E69F00', // Okabe–Ito orange
  lobeB: '#56B4E9', // Okabe–Ito sky blue
  union: '#BBBBBB',
  neck: '#F0E442', // Okabe–Ito yellow
  contact: '#FFFFFF',
  mergedCentroid: '#CC79A7', // Okabe–Ito reddish purple
  /** Smallest, middle, largest moment (also the gizmo's x, y, z, which carry letters too). */
  axes: ['#D55E00', '#009E73', '#0072B2'] as const, // Okabe–Ito vermillion, bluish green, blue
} as const
