import { join } from 'node:path'
import { and, desc, eq, inArray } from 'drizzle-orm'
import type { Lobe, Study } from '../db/schema'
import type { StudyInput } from '#shared/types/studies'
import { AU_M } from '#shared/types/studies'
import { anyPerpendicular, CONTACT_ALGORITHM_VERSION, norm, normalize, rejectFrom, summariseSpread } from '#shared/geometry'
import type { MassProperties, SpreadSample, Vec3 } from '#shared/geometry'
import { ALGORITHM_VERSION } from '#shared/utils/version'

export const STUDY_ALGORITHM_VERSION = `${ALGORITHM_VERSION}; ${CONTACT_ALGORITHM_VERSION}`

/** Derived files of a study result (union mesh), named by its cache key. */
export function studyMeshPaths(cacheKey: string) {
  const { derived } = uploadPaths()
  return { analysis: join(derived, `union-${cacheKey}.analysis.bin`), display: join(derived, `union-${cacheKey}.display.bin`) }
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
    lobeA: lobes.a ? { id: lobes.a.id, name: lobes.a.name, sha256: lobes.a.sha256 } : { id: s.lobeAId },
    lobeB: lobes.b ? { id: lobes.b.id, name: lobes.b.name, sha256: lobes.b.sha256 } : { id: s.lobeBId },
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

const controllers = new Map<number, AbortController>()

/** Everything that decides the numbers: both meshes, the validated input with densities filled in, the algorithm. */
export function studyCacheKey(a: Lobe, b: Lobe, input: StudyInput & { densityA: number, densityB: number }) {
  const { title: _t, ...numeric } = input
  return resultKey({ a: [a.sha256, a.units], b: [b.sha256, b.units], input: numeric, v: STUDY_ALGORITHM_VERSION })
}

/** Queues a study (or reuses a finished one with the same key) and returns its row. */
export async function createStudy(db: DB, ownerId: number, a: Lobe, b: Lobe, raw: StudyInput): Promise<Study> {
  const input = { ...raw, densityA: raw.densityA ?? a.density, densityB: raw.densityB ?? b.density }
  const cacheKey = studyCacheKey(a, b, input)
  const cached = await db.select().from(schema.studies).where(and(eq(schema.studies.cacheKey, cacheKey), eq(schema.studies.status, 'done'))).orderBy(desc(schema.studies.id)).get()
  const [row] = await db.insert(schema.studies).values({
    ownerId, lobeAId: a.id, lobeBId: b.id, title: input.title, input: input as unknown as Record<string, unknown>, cacheKey, algorithmVersion: STUDY_ALGORITHM_VERSION,
    ...(cached ? { status: 'done' as const, progress: 1, stage: 'reused an identical earlier result', result: cached.result, startedAt: new Date(), finishedAt: new Date() } : {}),
  }).returning()
  if (!cached) void runStudy(db, row!, a, b)
  return row!
}

async function runStudy(db: DB, study: Study, a: Lobe, b: Lobe) {
  const ctl = new AbortController()
  controllers.set(study.id, ctl)
  const input = study.input as unknown as StudyInput & { densityA: number, densityB: number }
  // Progress goes to the row at most every 200 ms, but never lost: a new stage is written at once,
  // and the latest report within a stage is written when the interval ends (a trailing write).
  let last = 0
  let lastStage = ''
  let pending: { progress: number, stage: string } | null = null
  let timer: ReturnType<typeof setTimeout> | undefined
  const write = (progress: number, stage: string) => {
    last = Date.now()
    lastStage = stage
    // Drizzle builders run only when awaited or then-ed: catch() starts the write without waiting for it.
    db.update(schema.studies).set({ progress, stage }).where(and(eq(schema.studies.id, study.id), eq(schema.studies.status, 'running')))
      .catch(() => undefined)
  }
  const report = (progress: number, stage: string) => {
    const now = Date.now()
    if (stage !== lastStage || now - last >= 200) {
      pending = null
      write(progress, stage)
      return
    }
    pending = { progress, stage }
    timer ??= setTimeout(() => {
      timer = undefined
      if (pending) write(pending.progress, pending.stage)
      pending = null
    }, Math.max(0, 200 - (now - last)))
  }
  try {
    // Other studies on the workers now (a cheap count; the pool's own queue also holds lobe jobs).
    const others = (await db.select({ id: schema.studies.id }).from(schema.studies).where(eq(schema.studies.status, 'running'))).filter(r => r.id !== study.id).length
    const waiting = others ? `waiting for a free worker (${others} other ${others === 1 ? 'study' : 'studies'} running)` : 'waiting for a free worker'
    await db.update(schema.studies).set({ status: 'running', startedAt: new Date(), stage: waiting }).where(eq(schema.studies.id, study.id))
    const propsA = a.properties as unknown as MassProperties
    const orbitA = input.orbit.kind === 'bound' ? input.orbit.semiMajorAxis : undefined
    const paths = studyMeshPaths(study.cacheKey)
    const result = await useWorkerPool().run<Record<string, unknown>>('study', {
      meshPathA: derivedMeshPaths(a.sha256, a.units).analysis,
      meshPathB: derivedMeshPaths(b.sha256, b.units).analysis,
      keyA: `${a.sha256}-${a.units}`,
      keyB: `${b.sha256}-${b.units}`,
      unionAnalysisPath: paths.analysis,
      unionDisplayPath: paths.display,
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
    }, {
      signal: ctl.signal,
      onProgress: (progress, stage) => report(progress * (input.spread ? 0.6 : 1), stage),
    })
    const contact = result.contact as { contact?: false, poseB?: { quaternion: [number, number, number, number] }, direction?: [number, number, number] }
    if (input.spread && contact.contact !== false && contact.poseB) {
      result.spread = await runSpreadChunks(study, a, b, input, contact.poseB.quaternion, ctl.signal, (f, stage) => report(0.6 + 0.4 * f, stage))
    }
    await db.update(schema.studies).set({ status: 'done', progress: 1, stage: 'done', result, finishedAt: new Date() })
      .where(and(eq(schema.studies.id, study.id), eq(schema.studies.status, 'running')))
  }
  catch (error) {
    const cancelled = error instanceof TaskCancelled
    await db.update(schema.studies).set({ status: cancelled ? 'cancelled' : 'failed', error: cancelled ? 'cancelled' : (error as Error).message, finishedAt: new Date() })
      .where(eq(schema.studies.id, study.id)).catch(() => undefined)
    if (!cancelled) console.error(`[isthmus] study ${study.id} failed:`, error)
  }
  finally {
    clearTimeout(timer)
    controllers.delete(study.id)
  }
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
  signal: AbortSignal, onProgress: (fraction: number, stage: string) => void) {
  const spec = input.spread!
  const context = { orientationB, ...approachOf(input, a.properties as unknown as MassProperties), spec }
  const chunk = Math.max(1, Math.ceil(spec.samples / 16))
  const done = new Float64Array(Math.ceil(spec.samples / chunk))
  const parts = await Promise.all(Array.from({ length: done.length }, (_, c) => useWorkerPool().run<SpreadSample[]>('spread-chunk', {
    meshPathA: derivedMeshPaths(a.sha256, a.units).analysis,
    meshPathB: derivedMeshPaths(b.sha256, b.units).analysis,
    context,
    contextKey: study.cacheKey,
    start: c * chunk,
    end: Math.min(spec.samples, (c + 1) * chunk),
  }, {
    signal,
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

/** Stops a queued or running study; true when there was something to stop. */
export async function cancelStudy(db: DB, id: number): Promise<boolean> {
  const ctl = controllers.get(id)
  const [row] = await db.update(schema.studies).set({ status: 'cancelled', error: 'cancelled', finishedAt: new Date() })
    .where(and(eq(schema.studies.id, id), inArray(schema.studies.status, ['queued', 'running']))).returning()
  ctl?.abort()
  return !!row
}

/** A study that was queued or running when the server stopped is marked failed: it did not finish. */
export async function recoverStudies(db: DB) {
  await db.update(schema.studies).set({ status: 'failed', error: 'interrupted by a server restart; run it again', finishedAt: new Date() })
    .where(inArray(schema.studies.status, ['queued', 'running']))
}
