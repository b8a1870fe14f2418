import { createHash } from 'node:crypto'
import { existsSync } from 'node:fs'
import { readFile, writeFile } from 'node:fs/promises'
import { join } from 'node:path'
import { and, desc, eq, inArray } from 'drizzle-orm'
import type { Job, Lobe } from '../db/schema'
import { summarise } from '#shared/geometry'
import type { MassProperties, Vec3 } from '#shared/geometry'
import { ALGORITHM_VERSION } from '#shared/utils/version'

/** Evaluation points for surface fields (faces of a simplified copy; the field is the full polyhedron's). */
export function fieldPointBudget() {
  return useConfig().fieldPoints
}
/** Face budget of the display copy sent to the 3D view (analysis always uses the full mesh). */
export function displayFaceBudget() {
  return useConfig().displayFaces
}

export interface SurfaceSummary {
  evaluation: { surface: 'mesh' | 'simplified', points: number, meshFaces: number }
  surfaceGravity: { min: number, max: number, mean: number }
  slopeDeg: { min: number, max: number, mean: number }
  geopotentialHeight: { min: number, max: number, mean: number }
  escapeSpeedSurface: { min: number, max: number, mean: number }
  spin: { periodHours: number, axis: Vec3 } | null
  /**
   * Where the slope exceeds 90° the net of gravity and the spin's centrifugal acceleration points
   * away from the surface: loose material there lifts off. Area-weighted fraction (0..1) and the
   * number of evaluation points; absent in summaries written before it was computed.
   */
  liftOff?: { areaFraction: number, points: number }
  fieldsFile: string
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

function jobView(job: Job | undefined) {
  if (!job) return null
  return { id: job.id, status: job.status, progress: job.progress, stage: job.stage, error: job.error }
}

/** The API's view of a lobe (names are a contract: see the issue and the OpenAPI document). */
export function lobeView(lobe: Lobe, job?: Job, owner?: { id: number, name: string }) {
  const p = lobe.properties as unknown as MassProperties
  const surface = lobe.surface as unknown as SurfaceSummary | null
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
    owner: owner ?? { id: lobe.ownerId },
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
      gravityJob: jobView(job),
    },
    report: lobe.report,
    /** Cautions about the surface fields (e.g. 'surface-lift-off'); empty when there are none. */
    surfaceCautions: surfaceCautions(surface, p.density),
  }
}

export type LobeView = ReturnType<typeof lobeView>

/** Latest surface job per lobe. */
export async function latestJobs(db: DB, lobeIds: number[]): Promise<Map<number, Job>> {
  if (!lobeIds.length) return new Map()
  const rows = await db.select().from(schema.jobs).where(and(inArray(schema.jobs.lobeId, lobeIds), eq(schema.jobs.kind, 'surface-field'))).orderBy(desc(schema.jobs.id))
  const map = new Map<number, Job>()
  for (const r of rows) if (r.lobeId !== null && !map.has(r.lobeId)) map.set(r.lobeId, r)
  return map
}

const running = new Map<number, AbortController>()

/** Queues the surface-field job of a lobe (cancelling an earlier one still running). */
export async function startSurfaceJob(db: DB, lobe: Lobe): Promise<Job> {
  for (const [jobId, ctl] of running) {
    const j = await db.select({ lobeId: schema.jobs.lobeId }).from(schema.jobs).where(eq(schema.jobs.id, jobId)).get()
    if (j?.lobeId === lobe.id) ctl.abort()
  }
  const [job] = await db.insert(schema.jobs).values({ kind: 'surface-field', lobeId: lobe.id, params: { points: fieldPointBudget() } }).returning()
  void runSurfaceJob(db, lobe, job!)
  return job!
}

async function runSurfaceJob(db: DB, lobe: Lobe, job: Job) {
  const ctl = new AbortController()
  running.set(job.id, ctl)
  const pool = useWorkerPool()
  const paths = derivedMeshPaths(lobe.sha256, lobe.units)
  let lastWrite = 0
  const setProgress = async (progress: number, stage: string, force = false) => {
    const now = Date.now()
    if (!force && now - lastWrite < 250) return
    lastWrite = now
    await db.update(schema.jobs).set({ progress, stage }).where(eq(schema.jobs.id, job.id))
  }
  try {
    await db.update(schema.jobs).set({ status: 'running', startedAt: new Date(), stage: 'choosing evaluation points' }).where(eq(schema.jobs.id, job.id))
    const props = lobe.properties as unknown as MassProperties
    const ev = await pool.run<{ positions: Float64Array, indices: Uint32Array, points: Float64Array, normals: Float64Array, areas: Float64Array, sameAsMesh: boolean }>(
      'field-prepare', { analysisMeshPath: paths.analysis, maxPoints: fieldPointBudget() }, { signal: ctl.signal })
    const n = ev.points.length / 3
    let omega: Vec3 | null = null
    let axis: Vec3 | null = null
    if (lobe.spinPeriodHours) {
      const a = (lobe.spinAxis ?? props.principalAxes[2]) as Vec3
      const len = Math.hypot(...a)
      axis = [a[0] / len, a[1] / len, a[2] / len]
      const w = (2 * Math.PI) / (lobe.spinPeriodHours * 3600)
      omega = [axis[0] * w, axis[1] * w, axis[2] * w]
    }
    // Chunks small enough that uploads waiting for a worker get one soon.
    // About 5 M face·point kernels (~0.1 s) per chunk (at least one point each, at most 4096 chunks).
    const chunks = Math.max(2, Math.min(4096, n, Math.ceil((n * lobe.faceCount) / 5e6)))
    const per = Math.ceil(n / chunks)
    const done = new Float64Array(chunks)
    const results = await Promise.all(Array.from({ length: chunks }, (_, c) => {
      const s = c * per
      const e = Math.min(n, s + per)
      return pool.run<{ gravity: Float64Array, slopeDeg: Float64Array, potential: Float64Array, escape: Float64Array }>('field-chunk', {
        analysisMeshPath: paths.analysis, density: lobe.density, points: ev.points.slice(3 * s, 3 * e), normals: ev.normals.slice(3 * s, 3 * e), omega,
      }, {
        signal: ctl.signal,
        onProgress: (f) => {
          done[c] = f * (e - s)
          void setProgress(0.05 + 0.93 * (done.reduce((a, b) => a + b, 0) / n), 'surface field')
        },
      })
    }))
    const join1 = (key: 'gravity' | 'slopeDeg' | 'potential' | 'escape') => {
      const out = new Float64Array(n)
      let o = 0
      for (const r of results) {
        out.set(r[key], o)
        o += r[key].length
      }
      return out
    }
    const gravity = join1('gravity')
    const slopeDeg = join1('slopeDeg')
    const potential = join1('potential')
    const escape = join1('escape')
    // Geopotential height: (U_eff,max − U_eff)/ḡ, metres above the lowest point of the effective potential's surface.
    let uMax = -Infinity
    for (const u of potential) uMax = Math.max(uMax, u)
    const gMean = summarise(gravity, ev.areas).mean
    const height = new Float64Array(n)
    for (let i = 0; i < n; i++) height[i] = (uMax - potential[i]) / gMean
    const fieldsFile = `fields-${lobe.id}-${job.id}.json`
    await writeFile(join(uploadPaths().derived, fieldsFile), JSON.stringify({
      lobeId: lobe.id,
      jobId: job.id,
      evaluation: ev.sameAsMesh ? 'mesh' : 'simplified',
      units: { gravity: 'm s^-2', slopeDeg: 'deg', geopotentialHeight: 'm', potential: 'm^2 s^-2', escapeSpeed: 'm s^-1', positions: 'm' },
      positions: Array.from(ev.positions),
      indices: Array.from(ev.indices),
      gravity: Array.from(gravity),
      slopeDeg: Array.from(slopeDeg),
      geopotentialHeight: Array.from(height),
      potential: Array.from(potential),
      escapeSpeed: Array.from(escape),
    }))
    const surface: SurfaceSummary = {
      evaluation: { surface: ev.sameAsMesh ? 'mesh' : 'simplified', points: n, meshFaces: lobe.faceCount },
      surfaceGravity: summarise(gravity, ev.areas),
      slopeDeg: summarise(slopeDeg, ev.areas),
      geopotentialHeight: summarise(height, ev.areas),
      escapeSpeedSurface: summarise(escape, ev.areas),
      spin: omega ? { periodHours: lobe.spinPeriodHours!, axis: axis! } : null,
      liftOff: liftOffShare(slopeDeg, ev.areas),
      fieldsFile,
    }
    await db.update(schema.lobes).set({ surface: surface as unknown as Record<string, unknown> }).where(eq(schema.lobes.id, lobe.id))
    await db.update(schema.jobs).set({ status: 'done', progress: 1, stage: 'done', finishedAt: new Date() }).where(eq(schema.jobs.id, job.id))
  }
  catch (error) {
    const cancelled = error instanceof TaskCancelled
    await db.update(schema.jobs).set({ status: cancelled ? 'cancelled' : 'failed', error: cancelled ? null : (error as Error).message, finishedAt: new Date() })
      .where(eq(schema.jobs.id, job.id)).catch(() => undefined)
    if (!cancelled) console.error(`[isthmus] surface job ${job.id} failed:`, error)
  }
  finally {
    running.delete(job.id)
  }
}

/** Reads the per-face fields written by the latest finished surface job, or null. */
export async function readFields(lobe: Lobe) {
  const surface = lobe.surface as unknown as SurfaceSummary | null
  if (!surface?.fieldsFile) return null
  const path = join(uploadPaths().derived, surface.fieldsFile)
  if (!existsSync(path)) return null
  return JSON.parse(await readFile(path, 'utf8')) as Record<string, unknown>
}

/** Cache key of a derived result: content hashes, parameters and the algorithm version. */
export function resultKey(parts: unknown): string {
  return createHash('sha256').update(JSON.stringify([ALGORITHM_VERSION, parts])).digest('hex')
}

/** A job that was running when the server stopped did not finish: say so, and start it again. */
export async function recoverSurfaceJobs(db: DB) {
  const stale = await db.select().from(schema.jobs).where(and(eq(schema.jobs.kind, 'surface-field'), inArray(schema.jobs.status, ['queued', 'running'])))
  for (const job of stale) {
    await db.update(schema.jobs).set({ status: 'failed', error: 'interrupted by a server restart', finishedAt: new Date() }).where(eq(schema.jobs.id, job.id))
    const lobe = job.lobeId ? await db.select().from(schema.lobes).where(eq(schema.lobes.id, job.lobeId)).get() : undefined
    if (lobe) await startSurfaceJob(db, lobe)
  }
}
