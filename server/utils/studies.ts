import { and, desc, eq, inArray, isNull } from 'drizzle-orm'
import type { Lobe, Study } from '../db/schema'
import type { StudyInput, StudyResult } from '#shared/types/studies'
import { AU_M } from '#shared/types/studies'
import { anyPerpendicular, CONTACT_ALGORITHM_VERSION, norm, normalize, rejectFrom, summariseSpread } from '#shared/geometry'
import type { MassProperties, Vec3 } from '#shared/geometry'
import { ALGORITHM_VERSION } from '#shared/utils/version'

export const STUDY_ALGORITHM_VERSION = `${ALGORITHM_VERSION}; ${CONTACT_ALGORITHM_VERSION}`

/** Store keys of a study result's derived files (union mesh), named by its cache key. */
export function studyMeshKeys(cacheKey: string) {
  return { analysis: derivedKey(`union-${cacheKey}.analysis.bin`), display: derivedKey(`union-${cacheKey}.display.bin`) }
}

/** A lobe a study names: its id, with name and content hash when they were loaded. */
function lobeRef(id: number, lobe?: Pick<Lobe, 'id' | 'name' | 'sha256'>): { id: number, name?: string, sha256?: string } {
  return lobe ? { id: lobe.id, name: lobe.name, sha256: lobe.sha256 } : { id }
}

/** The study as the API shows it (`result` keys are a contract: see the OpenAPI document). */
export function studyView(s: Study, lobes: { a?: Pick<Lobe, 'id' | 'name' | 'sha256'>, b?: Pick<Lobe, 'id' | 'name' | 'sha256'> } = {}, ownerName?: string) {
  return {
    id: s.id,
    title: s.title,
    status: s.status,
    progress: s.progress,
    stage: s.stage,
    error: s.error,
    owner: { id: s.ownerId, name: ownerName },
    lobeA: lobeRef(s.lobeAId, lobes.a),
    lobeB: lobeRef(s.lobeBId, lobes.b),
    input: s.input,
    result: s.result,
    algorithmVersion: s.algorithmVersion,
    createdAt: s.createdAt,
    startedAt: s.startedAt,
    finishedAt: s.finishedAt,
    frame: 'Contact frame: lobe A’s file axes with the origin at A’s centre of mass; B’s file coordinates map by x = R(poseB.quaternion)·x_B + poseB.translation.',
    assumptions: 'Two-body kinematics at the contact separation (the path before contact is not integrated); homogeneous lobes at the stated densities; meshes taken as exact surfaces. Estimates, not measurements.',
  }
}

/** Everything that decides the numbers: both meshes, the validated input with densities filled in, the algorithm. */
export function studyCacheKey(a: Lobe, b: Lobe, input: StudyInput & { densityA: number, densityB: number }) {
  const { title: _t, ...numeric } = input
  return resultKey({ a: [a.sha256, a.units], b: [b.sha256, b.units], input: numeric, v: STUDY_ALGORITHM_VERSION })
}

/**
 * Queues a study (or reuses a finished one with the same key, or joins the job of a queued or
 * running one with the same key) and returns its row. The study says `queued` until a task of its
 * job runs.
 */
export async function createStudy(db: DB, ownerId: number, a: Lobe, b: Lobe, raw: StudyInput): Promise<Study> {
  const input = { ...raw, densityA: raw.densityA ?? a.density, densityB: raw.densityB ?? b.density }
  const cacheKey = studyCacheKey(a, b, input)
  const cached = await db.select().from(schema.studies).where(and(eq(schema.studies.cacheKey, cacheKey), eq(schema.studies.status, 'done'))).orderBy(desc(schema.studies.id)).get()
  const [row] = await db.insert(schema.studies).values({
    ownerId, lobeAId: a.id, lobeBId: b.id, title: input.title, input, cacheKey, algorithmVersion: STUDY_ALGORITHM_VERSION,
    ...(cached ? { status: 'done' as const, progress: 1, stage: 'reused an identical earlier result', result: cached.result, startedAt: new Date(), finishedAt: new Date() } : { stage: 'queued: waiting for a free worker' }),
  }).returning()
  if (cached) return row!
  const { job, shared } = await submitJob(db, { kind: 'study', ownerId, inputsHash: cacheKey, algorithmVersion: STUDY_ALGORITHM_VERSION, studyId: row!.id, params: { studyId: row!.id } })
  const [linked] = await db.update(schema.studies).set({
    jobId: job.id,
    ...(shared && job.status === 'running' ? { status: 'running' as const, startedAt: new Date(), progress: job.progress, stage: job.stage } : {}),
  }).where(eq(schema.studies.id, row!.id)).returning()
  return linked!
}

/** The contact-study job: the study on one worker, then its spread in chunks on every worker. */
export const studyJob: JobKind = {
  async run({ db, job, task, progress }) {
    const studyId = Number((job.params as { studyId: number }).studyId)
    const study = await db.select().from(schema.studies).where(eq(schema.studies.id, studyId)).get()
    if (!study) throw new Error('the study of this job no longer exists')
    const [a, b] = await Promise.all([study.lobeAId, study.lobeBId].map(id => db.select().from(schema.lobes).where(eq(schema.lobes.id, id)).get()))
    if (!a || !b) throw new Error('a lobe of this study no longer exists')
    const input = study.input
    const propsA = a.properties as unknown as MassProperties
    const orbitA = input.orbit.kind === 'bound' ? input.orbit.semiMajorAxis : undefined
    const keys = studyMeshKeys(study.cacheKey)
    const result: Record<string, unknown> = await task('study', {
      analysisKeyA: derivedMeshKeys(a.sha256, a.units).analysis,
      analysisKeyB: derivedMeshKeys(b.sha256, b.units).analysis,
      keyA: `${a.sha256}-${a.units}`,
      keyB: `${b.sha256}-${b.units}`,
      unionAnalysisKey: keys.analysis,
      unionDisplayKey: keys.display,
      displayFaceBudget: displayFaceBudget(),
      input: {
        densityA: input.densityA,
        densityB: input.densityB,
        orientationB: input.orientationB,
        ...approachOf(input, propsA),
        observedSpinPeriod: input.observedSpinPeriodHours ? input.observedSpinPeriodHours * 3600 : undefined,
        sweepSteps: input.sweepSteps,
        // A screen with a non-bound orbit is refused by studyInputSchema (422 naming 'screen').
        screen: input.screen && orbitA !== undefined && input.orbit.kind === 'bound'
          ? { semiMajorAxis: orbitA, eccentricity: input.orbit.eccentricity, inclinationDeg: input.screen.inclinationDeg, heliocentricSemiMajorAxis: input.screen.heliocentricSemiMajorAxisAu * AU_M, heliocentricEccentricity: input.screen.heliocentricEccentricity, klPrefactor: input.screen.klPrefactor }
          : undefined,
        // The spread runs below in chunks on every worker, not inside this one task.
        spread: undefined,
      },
    }, { onProgress: (f, stage) => progress(f * (input.spread ? 0.6 : 1), stage) }) as unknown as Record<string, unknown>
    const contact = result.contact as { contact?: false, poseB?: { quaternion: [number, number, number, number] } }
    if (input.spread && contact.contact !== false && contact.poseB) {
      result.spread = await runSpreadChunks(study, a, b, input, contact.poseB.quaternion, task, (f, stage) => progress(0.6 + 0.4 * f, stage))
    }
    // Studies that still follow this job take its result (a cancelled study keeps its state).
    await db.update(schema.studies).set({ status: 'done', progress: 1, stage: 'done', result: result as unknown as StudyResult, finishedAt: new Date() })
      .where(and(eq(schema.studies.jobId, job.id), inArray(schema.studies.status, ['queued', 'running'])))
    return null
  },
  async mirror(db, job) {
    const follows = and(eq(schema.studies.jobId, job.id), inArray(schema.studies.status, ['queued', 'running']))
    if (job.status === 'running') {
      await db.update(schema.studies).set({ status: 'running', startedAt: new Date() }).where(and(eq(schema.studies.jobId, job.id), eq(schema.studies.status, 'queued')))
      await db.update(schema.studies).set({ progress: job.progress, stage: job.stage }).where(and(eq(schema.studies.jobId, job.id), eq(schema.studies.status, 'running')))
    }
    else if (job.status === 'queued') {
      await db.update(schema.studies).set({ status: 'queued', progress: 0, stage: job.stage }).where(follows)
    }
    else if (job.status === 'failed' || job.status === 'cancelled') {
      await db.update(schema.studies).set({ status: job.status, error: job.error ?? job.status, finishedAt: new Date() }).where(follows)
    }
  },
}

/** The approach and body settings shared by the study and its spread (orbit normal defaulted). */
function approachOf(input: StudyInput, propsA: MassProperties) {
  return {
    direction: input.direction,
    orbit: input.orbit,
    orbitNormal: input.orbitNormal ?? defaultOrbitNormal(propsA.principalAxes[2], input.direction),
    overlapDepth: input.overlapDepth,
    massModel: input.massModel,
    spinA: input.spinA,
    spinB: input.spinB,
  }
}

/** Runs the spread's samples in chunks on every worker and summarises them (seeded per sample index, so chunking changes nothing). */
async function runSpreadChunks(study: Study, a: Lobe, b: Lobe, input: StudyInput & { densityA: number, densityB: number }, orientationB: [number, number, number, number],
  task: JobContext['task'], onProgress: (fraction: number, stage: string) => void) {
  const spec = input.spread!
  const context = { orientationB, ...approachOf(input, a.properties as unknown as MassProperties), spec }
  const chunk = Math.max(1, Math.ceil(spec.samples / 16))
  const done = new Float64Array(Math.ceil(spec.samples / chunk))
  const parts = await Promise.all(Array.from({ length: done.length }, (_, c) => task('spread-chunk', {
    analysisKeyA: derivedMeshKeys(a.sha256, a.units).analysis,
    analysisKeyB: derivedMeshKeys(b.sha256, b.units).analysis,
    context,
    contextKey: study.cacheKey,
    start: c * chunk,
    end: Math.min(spec.samples, (c + 1) * chunk),
  }, {
    onProgress: (f) => {
      done[c] = f * (Math.min(spec.samples, (c + 1) * chunk) - c * chunk)
      onProgress(done.reduce((x, y) => x + y, 0) / spec.samples, 'spread')
    },
  })))
  const samples = parts.flat()
  return { ...summariseSpread(spec, samples), sampleValues: samples }
}

/**
 * The default plane of relative motion: A's largest-moment axis made perpendicular to the (unit)
 * line of centres. When that axis lies along the line (rejection shorter than 1e-9), any
 * perpendicular will do: the core's `anyPerpendicular` rejects the first file axis whose component
 * along the line is below 0.6 in magnitude (x, else y, else z).
 */
export function defaultOrbitNormal(axisC: Vec3, direction: Vec3): Vec3 {
  const n = rejectFrom(axisC, direction)
  return norm(n) < 1e-9 ? anyPerpendicular(direction) : normalize(n)
}

/** Stops a queued or running study; its job stops too unless another study follows it. True when there was something to stop. */
export async function cancelStudy(db: DB, id: number): Promise<boolean> {
  const [row] = await db.update(schema.studies).set({ status: 'cancelled', error: 'cancelled', finishedAt: new Date() })
    .where(and(eq(schema.studies.id, id), inArray(schema.studies.status, ['queued', 'running']))).returning()
  if (row?.jobId) {
    const others = await db.select({ id: schema.studies.id }).from(schema.studies)
      .where(and(eq(schema.studies.jobId, row.jobId), inArray(schema.studies.status, ['queued', 'running']))).get()
    if (!others) await cancelJob(db, row.jobId)
  }
  return !!row
}

/** Studies left queued or running by a server without the job engine have no job to resume: they did not finish. */
export async function recoverStudies(db: DB) {
  await db.update(schema.studies).set({ status: 'failed', error: 'interrupted by a server restart; run it again', finishedAt: new Date() })
    .where(and(inArray(schema.studies.status, ['queued', 'running']), isNull(schema.studies.jobId)))
}
