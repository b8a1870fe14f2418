/**
 * The lobe property table: one row per scalar or vector, with unit and meaning. Used by the lobe
 * page, its CSV export and (for hover help) the tables that show lobe values.
 */
export interface PropertyRow {
  key: string
  label: string
  unit: string
  help: string
}

export const LOBE_PROPERTY_ROWS: PropertyRow[] = [
  { key: 'density', label: 'Bulk density (assumed)', unit: 'kg m⁻³', help: 'The density you stated. Every mass-dependent value scales with it; it is an assumption, not a measurement.' },
  { key: 'volume', label: 'Volume', unit: 'm³', help: 'Volume enclosed by the mesh (signed tetrahedra; exact for the polyhedron).' },
  { key: 'surfaceArea', label: 'Surface area', unit: 'm²', help: 'Sum of the triangle areas.' },
  { key: 'mass', label: 'Mass', unit: 'kg', help: 'Volume × density, homogeneous interior assumed.' },
  { key: 'centroid', label: 'Centre of mass', unit: 'm', help: 'In the file axes, homogeneous interior assumed.' },
  { key: 'principalMoments', label: 'Principal moments A ≤ B ≤ C', unit: 'kg m²', help: 'Eigenvalues of the inertia tensor about the centre of mass.' },
  { key: 'equivalentRadius', label: 'Volume-equivalent radius', unit: 'm', help: 'Radius of the sphere of equal volume.' },
  { key: 'ellipsoidSemiAxes', label: 'Moment-matched ellipsoid semi-axes', unit: 'm', help: 'Homogeneous ellipsoid with the same mass and principal moments (its volume differs from the body’s).' },
  { key: 'deeveSemiAxes', label: 'DEEVE semi-axes', unit: 'm', help: 'Dynamically equivalent equal-volume ellipsoid: the moment-matched axes scaled to the body’s volume.' },
  { key: 'referenceRadius', label: 'Reference radius of J2, C22', unit: 'm', help: 'C_lm scale as R^−l: always quote R with the coefficients.' },
  { key: 'J2', label: 'J2 (unnormalised)', unit: '—', help: 'J2 = −C20 in the principal frame, at the reference radius. Independent of density for a homogeneous body.' },
  { key: 'C22', label: 'C22 (unnormalised)', unit: '—', help: 'In the principal frame (x along the smallest moment), at the reference radius.' },
  { key: 'C20Normalized', label: 'C̄20 (4π-normalised)', unit: '—', help: 'C̄20 = −J2/√5.' },
  { key: 'C22Normalized', label: 'C̄22 (4π-normalised)', unit: '—', help: 'C̄22 = C22/√(5/12).' },
  { key: 'maxRadius', label: 'Maximum radius', unit: 'm', help: 'Distance from the centre of mass to the farthest vertex.' },
  { key: 'escapeSpeedPointMass', label: 'Escape speed, point mass at max radius', unit: 'm s⁻¹', help: '√(2GM/r_max): a rough figure that ignores the shape and spin.' },
  { key: 'escapeSpeedSurface', label: 'Escape speed from the surface (polyhedral): mean (min – max)', unit: 'm s⁻¹', help: '√(2U) from the polyhedral potential at the evaluation points, non-rotating; min / max / mean.' },
  { key: 'surfaceGravity', label: 'Surface gravity: mean (min – max)', unit: 'm s⁻²', help: 'Magnitude of the polyhedral gravitational acceleration at the evaluation points; min / max / mean (area-weighted).' },
  { key: 'slopeDeg', label: 'Surface slope: mean (min – max)', unit: '°', help: 'Angle between the inward normal and the total acceleration (gravity + rotation if a spin is given).' },
  { key: 'geopotentialHeight', label: 'Geopotential height: mean (min – max)', unit: 'm', help: '(U_max − U)/ḡ of the effective potential: height above the lowest point.' },
]

/**
 * Further values the exports carry (the page shows them in their own layout): the full inertia
 * tensor and the frames, the degree-2 set in the file frame and the degree ≤ 4 harmonics.
 */
export const LOBE_EXPORT_EXTRA_ROWS: PropertyRow[] = [
  { key: 'inertia', label: 'Inertia tensor about the centre of mass', unit: 'kg m²', help: 'File axes; I = tr(C)E − C, so off-diagonal elements are minus the products of inertia. Row-major [i][j].' },
  { key: 'principalAxes', label: 'Principal axes (rows, A ≤ B ≤ C)', unit: '—', help: 'Unit rows in the file frame, right-handed.' },
  { key: 'rotationToPrincipal', label: 'Rotation file → principal frame', unit: '—', help: 'Rows = principal axes; maps file-frame vectors relative to the centre of mass into the principal frame.' },
  { key: 'degree2', label: 'Degree-2 coefficients, file frame', unit: '—', help: 'Unnormalised C20, C21, S21, C22, S22 in the FILE frame about the centre of mass (MacCullagh), at the reference radius.' },
  { key: 'harmonics', label: 'Harmonics to degree 4, principal frame', unit: '—', help: 'C[l][m], S[l][m] unnormalised and normalized (4π), principal frame about the centre of mass, at harmonics.referenceRadius (m), no Condon–Shortley phase.' },
]

/** Flattens a value into CSV cells: vectors and {min,max,mean} become several rows. */
export function flattenValue(key: string, value: unknown): { key: string, value: number }[] {
  if (typeof value === 'number') return [{ key, value }]
  if (Array.isArray(value)) return value.flatMap((v, i) => flattenValue(`${key}[${i}]`, v))
  if (value && typeof value === 'object') return Object.entries(value).flatMap(([k, v]) => flattenValue(`${key}.${k}`, v))
  return []
}
