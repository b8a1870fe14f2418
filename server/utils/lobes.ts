import { createHash } from 'node:crypto'
import { and, eq, inArray, sql } from 'drizzle-orm'
import type { Job, Lobe } from '../db/schema'
import { TREECODE_DEFAULTS } from '#shared/geometry'
import type { MassProperties, Vec3 } from '#shared/geometry'
import { ALGORITHM_VERSION } from '#shared/utils/version'
import { decodeFaceFields, type FaceFieldsFile } from '#shared/utils/face-fields-file'
import { decodeDisplayMesh, type DisplayMesh } from '#shared/utils/mesh-binary'

import type { SurfaceSummary } from '#shared/types/lobes'

/** Face budget of the display copy sent to the 3D view (analysis always uses the full mesh). */
export function displayFaceBudget() {
  return useConfig().displayFaces
}

/** Slope beyond which the net acceleration points off the surface, degrees. */
export const LIFT_OFF_SLOPE_DEG = 90

/** Area-weighted share of the evaluation points whose slope exceeds 90°. */
export function liftOffShare(slopeDeg: ArrayLike<number>, areas: ArrayLike<number>): { areaFraction: number, points: number } {
  let total = 0, off = 0, points = 0
  for (let i = 0; i < slopeDeg.length; i++) {
    const a = areas[i]!
    total += a
    if (slopeDeg[i]! > LIFT_OFF_SLOPE_DEG) { off += a; points++ }
  }
  return { areaFraction: total > 0 ? off / total : 0, points }
}

/**
 * Cautions about the surface fields, for people (lobe page) and programs (lobe view): loose
 * material lifting off where the spin beats gravity, or overhangs (slopes above 90° without spin,
 * e.g. under a concave neck).
 */
export function surfaceCautions(surface: SurfaceSummary | null, density: number): { code: string, message: string }[] {
  if (!surface || !(surface.slopeDeg.max > LIFT_OFF_SLOPE_DEG)) return []
  const share = surface.liftOff
    ? `${share100(surface.liftOff.areaFraction)} of the surface (by area, ${surface.liftOff.points} of ${surface.evaluation.points} evaluation points)`
    : 'part of the surface'
  if (!surface.spin) {
    return [{
      code: 'surface-overhang',
      message: `On ${share} the slope exceeds 90° (up to ${surface.slopeDeg.max.toFixed(1)}°) with no spin: gravity there points away from the surface, as under an overhang (typically in a concave neck). Loose material cannot rest there; these slopes follow the mesh's local shape and resolution, and they are estimates from a homogeneous interior.`,
    }]
  }
  return [{
    code: 'surface-lift-off',
    message: `On ${share} the slope exceeds 90° (up to ${surface.slopeDeg.max.toFixed(1)}°): the net of gravity and the centrifugal acceleration of the ${surface.spin.periodHours} h spin points away from the surface, so loose material there would lift off. At ${density} kg m⁻³ the lobe spins faster than its surface can hold loose material; a body really spinning this fast needs cohesion or a higher density there, or it sheds material.`,
  }]
}

function share100(f: number): string {
  const p = f * 100
  return `${p >= 10 ? p.toFixed(0) : p >= 0.1 ? p.toFixed(1) : p > 0 ? '< 0.1' : '0'} %`
}

function gravityJobView(job: (Job & { queuePosition?: number }) | undefined) {
  if (!job) return null
  const v = jobView(job, job.queuePosition)
  return { id: v.id, status: v.status, progress: v.progress, stage: v.stage, error: v.error, queuePosition: v.queuePosition }
}

/** The API's view of a lobe (names are a contract: see the issue and the OpenAPI document). */
export function lobeView(lobe: Lobe, job?: Job & { queuePosition?: number }, owner?: { id: number, name?: string }) {
  const p = lobe.properties as unknown as MassProperties
  const surface = lobe.surface
  return {
    id: lobe.id,
    name: lobe.name,
    sha256: lobe.sha256,
    sourceFileName: lobe.sourceFileName,
    format: lobe.format,
    units: lobe.units,
    vertexCount: lobe.vertexCount,
    faceCount: lobe.faceCount,
    warnings: lobe.warnings,
    owner: owner ?? { id: lobe.ownerId } as { id: number, name?: string },
    createdAt: lobe.createdAt,
    algorithmVersion: lobe.algorithmVersion,
    spinPeriodHours: lobe.spinPeriodHours,
    spinAxis: lobe.spinAxis,
    assumptions: 'Homogeneous interior at the stated bulk density; the mesh is taken as the exact surface. Estimates, not measurements. escapeSpeedSurface is the non-rotating escape speed √(2U) even when a spin is given (slopeDeg and geopotentialHeight include the spin).',
    frames: 'Vectors and tensors are in the file axes (metres, origin of the file) unless named otherwise; principalAxes rows are unit vectors in A ≤ B ≤ C order, right-handed. C20Normalized = −J2/√5 (4π normalisation).',
    properties: {
      density: p.density,
      volume: p.volume,
      surfaceArea: p.surfaceArea,
      mass: p.mass,
      centroid: p.centroid,
      inertia: p.inertia,
      principalMoments: p.principalMoments,
      principalAxes: p.principalAxes,
      equivalentRadius: p.equivalentRadius,
      ellipsoidSemiAxes: p.ellipsoidSemiAxes,
      deeveSemiAxes: p.deeveSemiAxes,
      referenceRadius: p.referenceRadius,
      J2: p.J2,
      C22: p.C22,
      C20Normalized: p.C20Normalized,
      C22Normalized: p.C22Normalized,
      degree2: p.degree2,
      rotationToPrincipal: p.rotationToPrincipal,
      harmonics: p.harmonics,
      boundingBox: p.boundingBox,
      maxRadius: p.maxRadius,
      escapeSpeedPointMass: p.escapeSpeedPointMass,
      escapeSpeedSurface: surface?.escapeSpeedSurface ?? null,
      surfaceGravity: surface?.surfaceGravity ?? null,
      slopeDeg: surface?.slopeDeg ?? null,
      liftOff: surface?.spin ? (surface.liftOff ?? null) : null,
      geopotentialHeight: surface?.geopotentialHeight ?? null,
      surfaceEvaluation: surface?.evaluation ?? null,
      components: p.components ?? null,
      G: p.G,
      gravityJob: gravityJobView(job),
    },
    /**
     * The surface-field run: which points carry the field (every face centroid: `evaluation.points`
     * equals `faceCount`), the treecode accuracy and its sampled error, ḡ, the spin used.
     */
    surface: surface
      ? {
          evaluation: surface.evaluation,
          accuracy: surface.accuracy ?? null,
          meanGravity: surface.meanGravity ?? null,
          spin: surface.spin,
          conventions: 'potential and geopotentialHeight are of the effective potential U + ½|ω × r|² (spin about the volume centroid); surfaceGravity |g| and escapeSpeedSurface √(2U) are of gravity alone (non-rotating); slopeDeg uses the effective acceleration. GET /api/lobes/:id/fields gives both versions per face.',
        }
      : null,
    report: lobe.report,
    /** Cautions about the surface fields (e.g. 'surface-lift-off'); empty when there are none. */
    surfaceCautions: surfaceCautions(surface, p.density),
  }
}

export type LobeView = ReturnType<typeof lobeView>

/** The current surface job of each lobe (the one whose result its `surface` takes), with its queue position. */
export async function latestJobs(db: DB, lobeIds: number[]): Promise<Map<number, Job & { queuePosition?: number }>> {
  if (!lobeIds.length) return new Map()
  const rows = await db.select({ lobeId: schema.lobes.id, job: schema.jobs }).from(schema.lobes)
    .innerJoin(schema.jobs, eq(schema.jobs.id, schema.lobes.surfaceJobId))
    .where(inArray(schema.lobes.id, lobeIds))
  const positions = rows.some(r => r.job.status === 'queued') ? await queuePositions(db) : new Map<number, number>()
  return new Map(rows.map(r => [r.lobeId, { ...r.job, queuePosition: positions.get(r.job.id) }]))
}

/** Everything that decides a lobe's surface fields: mesh, units, density, spin, treecode accuracy (every face is evaluated). */
export function surfaceInputs(lobe: Pick<Lobe, 'sha256' | 'units' | 'density' | 'spinPeriodHours' | 'spinAxis'>) {
  return { sha256: lobe.sha256, units: lobe.units, density: lobe.density, spinPeriodHours: lobe.spinPeriodHours, spinAxis: lobe.spinAxis, accuracy: TREECODE_DEFAULTS.accuracy }
}

/**
 * Gives a lobe its surface-field job: reuses an identical finished one (its summary at once), joins
 * an identical queued or running one, or queues a new one. Only the job named in
 * `lobes.surface_job_id` may write the lobe's `surface`, so an older job (e.g. before a density
 * change) that finishes later writes nothing.
 */
export async function startSurfaceJob(db: DB, lobe: Lobe, ownerId?: number | null): Promise<Job> {
  const inputsHash = resultKey(surfaceInputs(lobe))
  const previous = lobe.surfaceJobId
  const done = await reusableJob(db, 'surface-field', inputsHash, ALGORITHM_VERSION)
  let job: Job
  if (done?.result && await (await useMeshStore()).exists(derivedKey(String(done.result.fieldsFile)))) {
    await db.update(schema.lobes).set({ surface: done.result as unknown as SurfaceSummary, surfaceJobId: done.id }).where(eq(schema.lobes.id, lobe.id))
    job = done
  }
  else {
    job = (await submitJob(db, { kind: 'surface-field', ownerId: ownerId ?? lobe.ownerId, inputsHash, algorithmVersion: ALGORITHM_VERSION, lobeId: lobe.id, params: { lobeId: lobe.id, ...surfaceInputs(lobe) } })).job
    await db.update(schema.lobes).set({ surfaceJobId: job.id }).where(eq(schema.lobes.id, lobe.id))
  }
  // The job this lobe followed before: cancelled when no other lobe follows it now.
  if (previous && previous !== job.id) {
    const others = await db.select({ id: schema.lobes.id }).from(schema.lobes).where(eq(schema.lobes.surfaceJobId, previous)).get()
    if (!others) await cancelJob(db, previous, 'superseded: the lobe changed')
  }
  return job
}

/**
 * The surface-field job: the fields at every face of the analysis mesh by the treecode, in chunks
 * of faces spread over the workers, with the sampled direct-sum error estimate; one summary.
 */
export const surfaceFieldJob: JobKind = {
  async run({ db, job, task, progress }) {
    const p = job.params as unknown as ReturnType<typeof surfaceInputs> & { lobeId: number }
    // The lobe it was made for, or (that one deleted) any lobe still following it.
    const source = await db.select().from(schema.lobes).where(eq(schema.lobes.id, p.lobeId)).get()
      ?? await db.select().from(schema.lobes).where(eq(schema.lobes.surfaceJobId, job.id)).get()
    const props = source?.properties as unknown as MassProperties | undefined
    if (!source || !props) throw new Error('the lobe of this surface job no longer exists')
    const analysisKey = derivedMeshKeys(p.sha256, p.units).analysis
    let omega: Vec3 | null = null
    let spin: { periodHours: number, axis: Vec3, axisSource: string } | null = null
    if (p.spinPeriodHours) {
      const a = (p.spinAxis ?? props.principalAxes[2]) as Vec3
      const len = Math.hypot(...a)
      const axis: Vec3 = [a[0] / len, a[1] / len, a[2] / len]
      const w = (2 * Math.PI) / (p.spinPeriodHours * 3600)
      omega = [axis[0] * w, axis[1] * w, axis[2] * w]
      spin = { periodHours: p.spinPeriodHours, axis, axisSource: p.spinAxis ? 'given with the lobe' : 'default: the axis of the largest principal moment' }
    }
    const full = await computeFullFields(task as RunTask, { analysisKey, faceCount: source.faceCount, density: p.density, omega, spin, accuracy: p.accuracy, onProgress: progress })
    const fieldsFile = `fields-${job.id}.bin`
    await (await useMeshStore()).write(derivedKey(fieldsFile), full.bytes)
    const surface: SurfaceSummary = {
      evaluation: { surface: 'mesh', points: full.faceCount, meshFaces: source.faceCount },
      accuracy: { requested: { potential: full.accuracy / 10, gravity: full.accuracy }, estimated: full.error },
      meanGravity: full.meanGravity,
      ...fullFieldSummaries(full),
      spin: spin ? { periodHours: spin.periodHours, axis: spin.axis } : null,
      liftOff: liftOffShare(full.fields.slopeDeg, full.areas),
      fieldsFile,
    }
    // Only lobes that still follow this job take its result, and only while it is not cancelled.
    await db.update(schema.lobes).set({ surface })
      .where(and(eq(schema.lobes.surfaceJobId, job.id), sql`exists (select 1 from jobs where jobs.id = ${job.id} and jobs.status = 'running')`))
    return surface as unknown as Record<string, unknown>
  },
}

/**
 * The per-face fields file of the lobe's finished surface job, or null while there is none (fields
 * written by an older version, on a simplified copy, count as none: the lobe gets a new job).
 */
export async function readFields(lobe: Lobe): Promise<FaceFieldsFile | null> {
  const surface = lobe.surface as unknown as SurfaceSummary | null
  if (!surface?.fieldsFile) return null
  const store = await useMeshStore()
  const key = derivedKey(surface.fieldsFile)
  if (!surface.fieldsFile.endsWith('.bin') || !(await store.exists(key))) {
    await startSurfaceJob(useDB(), lobe)
    return null
  }
  return decodeFaceFields(await store.read(key))
}

/**
 * The lobe's display copy and, for each of its faces, the nearest analysis-mesh face (kept next to
 * the display file), so the 3D view is coloured from the full field.
 */
export async function displayFaceMap(lobe: Lobe): Promise<{ display: DisplayMesh, map: Uint32Array }> {
  const keys = derivedMeshKeys(lobe.sha256, lobe.units)
  const store = await useMeshStore()
  const bytes = await store.read(await ensureDisplayMesh(lobe.sha256, lobe.units))
  const display = decodeDisplayMesh(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer)
  const mapKey = derivedKey(`${keys.key}.display-map.bin`)
  if (await store.exists(mapKey)) {
    const b = await store.read(mapKey)
    const map = new Uint32Array(b.byteLength / 4)
    new Uint8Array(map.buffer).set(b)
    if (map.length === display.indices.length / 3) return { display, map }
  }
  const map = await runWorkerTask('field-display-map', { analysisKey: keys.analysis, positions: display.positions, indices: display.indices, origin: display.origin }, { interactive: true, priority: 5 })
  await store.write(mapKey, new Uint8Array(map.buffer, map.byteOffset, map.byteLength))
  return { display, map }
}

/** Cache key of a derived result: content hashes, parameters and the algorithm version. */
export function resultKey(parts: unknown): string {
  return createHash('sha256').update(JSON.stringify([ALGORITHM_VERSION, parts])).digest('hex')
}
