import type { H3Event } from 'h3'
import { eq } from 'drizzle-orm'
import type { Lobe } from '../db/schema'
import type { TaskName, TaskPayload, TaskProgress, TaskResult } from '../workers/tasks'
import { idParamSchema } from '#shared/types/account'
import { ALGORITHM_VERSION } from '#shared/utils/version'
import { FACE_FIELD_KEYS, FACE_FIELD_UNITS, TREECODE_DEFAULTS, coefficientsFromSums, compareWithDirect, geopotentialHeight, sampleIndices, summarise } from '#shared/geometry'
import type { CoefficientFrame, FaceFields, GravityCoefficients, MassProperties, TreecodeErrorEstimate, Vec3 } from '#shared/geometry'
import { encodeFaceFields, type FaceFieldsFile, type FaceFieldsHeader } from '#shared/utils/face-fields-file'

/** Runs one worker task: a job's `task` helper (its lane on the workers). */
export type RunTask = <K extends TaskName>(task: K, payload: TaskPayload<K>, opts?: { onProgress?: TaskProgress }) => Promise<TaskResult<K>>

/** Faces checked against the direct sum per job (the error estimate reported with the field). */
export const FIELD_CHECK_SAMPLES = 16

/** Conventions written with every per-face field (the API, the export and the page show them). */
export function fieldConventions(spin: { periodHours: number, axis: Vec3, axisSource: string } | null, meanGravity: number) {
  return {
    points: 'every face of the analysis mesh, at its centroid (file frame, metres); row i = face i',
    potential: 'U > 0 gravitational potential (m^2 s^-2); potential = effective potential U + ½|ω × r|², r from the volume centroid (equal to U without spin)',
    gravity: '|g| of gravity alone (non-rotating); effectiveGravity |g − ω × (ω × r)| with the spin',
    slope: 'slopeDeg: angle between −n̂ and the effective acceleration (with spin); slopeNonRotatingDeg: with gravity alone',
    escapeSpeed: 'escapeSpeed √(2U): inertial, body not spinning; escapeSpeedAlongRotation max(0, √(2U) − |ω × r|): relative to the rotating surface, launched along its own velocity',
    geopotentialHeight: `(U_eff,max − U_eff)/ḡ, metres above the point of highest effective potential; ḡ = ${meanGravity.toPrecision(6)} m s^-2, the area-weighted mean of effectiveGravity`,
    meanGravity,
    spin: spin ? { periodHours: spin.periodHours, axis: spin.axis, axisSource: spin.axisSource, note: 'axis through the volume centroid, file-frame unit vector' } : null,
    method: 'treecode (surface-form multipoles, exact Werner & Scheeres faces near each point) on the full polyhedron; homogeneous interior at the stated density; estimates, not measurements',
  }
}

export interface FullFieldsResult {
  bytes: Uint8Array
  faceCount: number
  areas: Float64Array
  fields: FaceFields & { geopotentialHeight: Float64Array }
  error: TreecodeErrorEstimate
  accuracy: number
  meanGravity: number
}

export interface FullFieldsOptions {
  /** Store key of the analysis mesh. */
  analysisKey: string
  faceCount: number
  density: number
  /** ω, rad s⁻¹, file-frame components, about the volume centroid; null: not rotating. */
  omega: Vec3 | null
  spin: { periodHours: number, axis: Vec3, axisSource: string } | null
  /** Treecode accuracy (relative, |g|); default TREECODE_DEFAULTS.accuracy. */
  accuracy?: number
  onProgress?: (fraction: number, stage: string) => void
}

/**
 * Per-face fields at every face of the analysis mesh: chunks of faces spread over the workers
 * ('field-faces', each worker builds the treecode once and keeps it), the direct-sum samples of the
 * error estimate ('field-checks') alongside, then the geopotential height, and the fields file.
 */
export async function computeFullFields(run: RunTask, opts: FullFieldsOptions): Promise<FullFieldsResult> {
  const n = opts.faceCount
  const accuracy = opts.accuracy ?? TREECODE_DEFAULTS.accuracy
  // ~2 000 faces per chunk (~0.1–0.3 s once a worker has built the tree, which its first chunk
  // does): other jobs get a worker within one chunk's time
  const chunks = Math.max(2, Math.min(4096, Math.ceil(n / 2000)))
  const per = Math.ceil(n / chunks)
  const fields = Object.fromEntries(FACE_FIELD_KEYS.map(k => [k, new Float64Array(n)])) as FaceFields
  const centroid = [new Float64Array(n), new Float64Array(n), new Float64Array(n)] as const
  const areas = new Float64Array(n)
  const done = new Float64Array(chunks)
  const report = () => opts.onProgress?.(0.02 + 0.9 * (done.reduce((a, b) => a + b, 0) / n), 'surface field')
  const idx = sampleIndices(n, FIELD_CHECK_SAMPLES)
  const checks = run('field-checks', { analysisKey: opts.analysisKey, density: opts.density, indices: idx })
  const runChunk = async (c: number) => {
    const start = c * per, end = Math.min(n, start + per)
    if (end <= start) return
    const part = await run('field-faces', { analysisKey: opts.analysisKey, density: opts.density, omega: opts.omega, accuracy, start, end }, {
      onProgress: (f) => { done[c] = f * (end - start); report() },
    })
    for (const k of FACE_FIELD_KEYS) fields[k].set(part[k], start)
    for (let i = 0; i < end - start; i++) {
      centroid[0][start + i] = part.centroids[3 * i]!; centroid[1][start + i] = part.centroids[3 * i + 1]!; centroid[2][start + i] = part.centroids[3 * i + 2]!
    }
    areas.set(part.areas, start)
  }
  // The first chunk alone: one worker builds its tree while the other stays free; then the rest
  // (the other worker builds its own tree with its first chunk, while the first one keeps taking
  // short chunks), so other jobs never wait for two tree builds at once.
  await runChunk(0)
  await Promise.all(Array.from({ length: chunks - 1 }, (_, c) => runChunk(c + 1)))
  opts.onProgress?.(0.93, 'direct-sum checks')
  const error = compareWithDirect(await checks, idx, fields.gravitationalPotential, null, fields.gravity)
  const { height, meanGravity } = geopotentialHeight(fields.effectivePotential, fields.effectiveGravity, areas)
  const header: FaceFieldsHeader = {
    columns: ['centroidX', 'centroidY', 'centroidZ', 'area', ...FACE_FIELD_KEYS, 'geopotentialHeight'],
    units: { centroidX: 'm', centroidY: 'm', centroidZ: 'm', area: 'm^2', ...FACE_FIELD_UNITS },
    evaluation: 'mesh',
    faceCount: n,
    density: opts.density,
    accuracy: { requested: { potential: accuracy / 10, gravity: accuracy }, estimated: error },
    conventions: fieldConventions(opts.spin, meanGravity),
  }
  const bytes = encodeFaceFields(header, { centroidX: centroid[0], centroidY: centroid[1], centroidZ: centroid[2], area: areas, ...fields, geopotentialHeight: height })
  return { bytes, faceCount: n, areas, fields: { ...fields, geopotentialHeight: height }, error, accuracy, meanGravity }
}

/** Area-weighted summaries of the full field for the lobe's `surface` record. */
export function fullFieldSummaries(r: FullFieldsResult) {
  return {
    surfaceGravity: summarise(r.fields.gravity, r.areas),
    slopeDeg: summarise(r.fields.slopeDeg, r.areas),
    geopotentialHeight: summarise(r.fields.geopotentialHeight, r.areas),
    escapeSpeedSurface: summarise(r.fields.escapeSpeed, r.areas),
  }
}

/**
 * A lobe and its finished per-face fields.
 * @throws 404 when the lobe does not exist, 409 (with the field job's state) while they are computed
 */
export async function readyLobeFields(id: number) {
  const db = useDB()
  const lobe = await db.select().from(schema.lobes).where(eq(schema.lobes.id, id)).get()
  if (!lobe) throw notFound('Lobe')
  const file = await readFields(lobe)
  if (!file) {
    const job = (await latestJobs(db, [id])).get(id)
    throw createError({ status: 409, statusText: 'Conflict', message: 'The surface fields are not ready yet', data: { gravityJob: job ? { id: job.id, status: job.status, progress: job.progress } : null } })
  }
  return { lobe, file }
}

/**
 * A lobe and its per-face fields for an export route (viewer; token exports are audited as the
 * other lobe exports).
 * @throws 404 when the lobe does not exist, 409 while its fields are being computed
 */
export async function lobeFieldsForExport(event: H3Event, format: 'csv' | 'ply') {
  const actor = await requireRole(event, 'viewer')
  const { id } = paramsAs(event, idParamSchema)
  const { lobe, file } = await readyLobeFields(id)
  if (actor.via === 'token') await audit(event, { actorId: actor.id, action: 'lobe.exported', subjectType: 'lobe', subjectId: id, detail: { format: `fields-${format}`, token: actor.tokenId } })
  return { lobe, file }
}

/** Comment lines of the per-face exports: what the numbers are and the conventions they follow. */
export function fieldExportComments(lobe: Lobe, file: FaceFieldsFile): string[] {
  const c = file.header.conventions as Record<string, unknown>
  const acc = file.header.accuracy as { requested: { potential: number, gravity: number }, estimated: TreecodeErrorEstimate }
  return [
    `Isthmus per-face surface fields, lobe ${lobe.id}, mesh sha256 ${lobe.sha256}, ${file.faceCount} faces, density ${lobe.density} kg m^-3, ${ALGORITHM_VERSION}`,
    ...['points', 'potential', 'gravity', 'slope', 'escapeSpeed', 'geopotentialHeight', 'method'].map(k => `${k}: ${String(c[k])}`),
    `spin: ${c.spin ? JSON.stringify(c.spin) : 'not rotating'}`,
    `treecode accuracy requested: U ${acc.requested.potential}, |g| ${acc.requested.gravity} (relative); estimated from ${acc.estimated.samples} direct-sum samples: U ${acc.estimated.maxRelativePotential.toExponential(2)}, |g| ${acc.estimated.maxRelativeGravity.toExponential(2)}`,
  ]
}

/**
 * Gravity-field coefficients of a lobe (homogeneous at its density) to `degree`, in its principal
 * frame or the file axes (origin at the volume centroid either way), computed on the workers (the
 * faces split in two) and kept in a derived file keyed by mesh, degree, frame, R, density and the
 * algorithm version.
 */
export async function lobeHarmonics(lobe: Lobe, degree: number, frameKind: 'principal' | 'file', referenceRadius?: number): Promise<GravityCoefficients> {
  const props = lobe.properties as unknown as MassProperties
  const R = referenceRadius ?? props.referenceRadius
  const frame: CoefficientFrame = {
    kind: frameKind, origin: props.centroid,
    axes: frameKind === 'principal' ? props.rotationToPrincipal : [[1, 0, 0], [0, 1, 0], [0, 0, 1]],
  }
  const keys = derivedMeshKeys(lobe.sha256, lobe.units)
  const store = await useMeshStore()
  const cacheKey = derivedKey(`harmonics-${resultKey({ mesh: keys.key, degree, frame, R, density: lobe.density })}.json`)
  if (await store.exists(cacheKey)) return JSON.parse(new TextDecoder().decode(await store.read(cacheKey))) as GravityCoefficients
  const n = lobe.faceCount, half = Math.ceil(n / 2)
  const parts = await Promise.all([[0, half], [half, n]].map(([start, end]) => runWorkerTask('coefficient-sums', { analysisKey: keys.analysis, frame, referenceRadius: R, degree, start: start!, end: end! }, { interactive: true, priority: 5 })))
  const sums = parts[0]!
  for (let k = 0; k < sums.length; k++) sums[k] = sums[k]! + parts[1]![k]!
  const co = coefficientsFromSums(sums, degree, R, lobe.density, frame)
  await store.write(cacheKey, JSON.stringify(co))
  return co
}

/** The lines above every coefficient table (CSV comments, text header): everything the numbers depend on. */
export function harmonicsHeader(lobe: Lobe, co: GravityCoefficients): string[] {
  return [
    `Isthmus gravity-field coefficients, lobe ${lobe.id} (mesh sha256 ${lobe.sha256}), homogeneous polyhedron, exact per signed tetrahedron; ${ALGORITHM_VERSION}`,
    `degree ${co.degree}; reference radius R = ${co.referenceRadius} m; GM = ${co.GM} m^3 s^-2 (G = 6.67430e-11, density ${co.density} kg m^-3)`,
    `frame: ${co.frame.kind === 'principal' ? 'principal axes (x along the smallest moment, z along the largest)' : 'file axes'}, origin at the volume centroid ${co.frame.origin.join(' ')} m (file frame); axes (rows, file-frame components): ${co.frame.axes.map(r => r.join(' ')).join(' | ')}`,
    `normalization: ${co.normalization}`,
    'caution: homogeneous-interior model of the uploaded shape; an estimate, not a measurement',
  ]
}

/** CSV of the coefficients: comment lines, then l,m,C,S,Cbar,Sbar. */
export function harmonicsCsv(lobe: Lobe, co: GravityCoefficients): string {
  const lines = [...harmonicsHeader(lobe, co).map(h => `# ${h}`), 'l,m,C,S,Cbar,Sbar']
  for (let l = 0; l <= co.degree; l++) for (let m = 0; m <= l; m++) lines.push([l, m, co.C[l]![m], co.S[l]![m], co.Cbar[l]![m], co.Sbar[l]![m]].join(','))
  return `${lines.join('\r\n')}\r\n`
}

/** Plain fixed-width text table of the coefficients; the header states frame, R, GM and normalisation. */
export function harmonicsText(lobe: Lobe, co: GravityCoefficients): string {
  const e = (v: number) => v.toExponential(15).padStart(24)
  const lines = [...harmonicsHeader(lobe, co), '', `${'l'.padStart(4)}${'m'.padStart(4)}${'C'.padStart(24)}${'S'.padStart(24)}${'Cbar'.padStart(24)}${'Sbar'.padStart(24)}`]
  for (let l = 0; l <= co.degree; l++) for (let m = 0; m <= l; m++) lines.push(`${String(l).padStart(4)}${String(m).padStart(4)}${e(co.C[l]![m]!)}${e(co.S[l]![m]!)}${e(co.Cbar[l]![m]!)}${e(co.Sbar[l]![m]!)}`)
  return `${lines.join('\n')}\n`
}
