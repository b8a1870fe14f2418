import { randomUUID } from 'node:crypto'
import { eq } from 'drizzle-orm'
import type { Lobe } from '../../../db/schema'
import { idParamSchema } from '#shared/types/account'
import { lobeSplitSchema } from '#shared/types/lobes'

/**
 * Cut a whole-body mesh at its neck into two closed lobes of their own → 201 `{ plane, neckArea, lobes: [A, B] }`, A the larger part.
 * Each part names its parent in `report.origin` (`{ kind: 'cut' as const, lobeId, lobeName, side, plane, neckArea }`)
 * and carries a 'cut-face' warning: its flat cut face is synthetic.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const { id } = paramsAs(event, idParamSchema)
  const { plane } = await readBodyAs(event, lobeSplitSchema)
  const db = useDB()
  const lobe = await db.select().from(schema.lobes).where(eq(schema.lobes.id, id)).get()
  if (!lobe) throw notFound('Lobe')
  // The parts are temporary files until both are lobes: a split makes both lobes or none.
  const tag = randomUUID()
  const outKeys: [string, string] = [`tmp/split-${tag}-a.bin`, `tmp/split-${tag}-b.bin`]
  const store = await useMeshStore()
  const made: { lobe: Lobe, job: Awaited<ReturnType<typeof lobeFromAnalysisMesh>>['job'] }[] = []
  let split
  try {
    try {
      split = await runWorkerTask('split', {
        analysisKey: derivedMeshKeys(lobe.sha256, lobe.units).analysis,
        // The analysis mesh is stored in metres, like the plane point: no unit conversion here.
        plane,
        outKeys,
      }, { interactive: true, priority: 5 })
    }
    catch (error) {
      throw toHttpError(error)
    }
    // Part A is the larger part, part B the smaller (the usual order of a primary and a secondary).
    const order = split.positiveVolume >= split.negativeVolume ? [0, 1] : [1, 0]
    for (const [rank, i] of order.entries()) {
      const side = i === 0 ? '+normal' : '−normal'
      // The parent is known only here: each part keeps it in its report, and says in a warning that
      // its flat cut face was made by the cut, not uploaded.
      const origin = { kind: 'cut' as const, lobeId: lobe.id, lobeName: lobe.name, side, plane: split.plane, neckArea: split.neckArea }
      made.push(await lobeFromAnalysisMesh(outKeys[i]!, {
        ownerId: actor.id, name: `${lobe.name} — part ${rank === 0 ? 'A' : 'B'}`, fileName: `${lobe.name}-part-${rank === 0 ? 'a' : 'b'}.ply`, density: lobe.density,
        extraWarnings: [cutFaceWarning(lobe, split, side)], origin,
      }))
    }
  }
  catch (error) {
    await undoLobes(db, made.map(m => m.lobe))
    throw error
  }
  finally {
    for (const k of outKeys) await store.remove(k).catch(() => undefined)
  }
  await audit(event, { actorId: actor.id, action: 'lobe.split', subjectType: 'lobe', subjectId: id, detail: { into: made.map(m => m.lobe.id) } })
  setResponseStatus(event, 201)
  return { plane: split.plane, neckArea: split.neckArea, lobes: made.map(m => lobeView(m.lobe, m.job, { id: actor.id, name: actor.name })) }
})

/** A vector for people, components below 1e-12 of its largest shown as 0 (round-off, as on the pages). */
function vec(v: readonly number[]) {
  const scale = Math.max(...v.map(Math.abs))
  return `(${v.map(x => (Math.abs(x) < 1e-12 * scale ? 0 : Number(x.toPrecision(6)))).join(', ')})`
}

/** The warning each part carries: where it was cut from, and that its cut face is synthetic. */
function cutFaceWarning(parent: { id: number, name: string }, split: { plane: { point: number[], normal: number[] }, neckArea: number }, side: string) {
  return {
    code: 'cut-face',
    message: `Cut from lobe #${parent.id} '${parent.name}' (the ${side} side of the plane through ${vec(split.plane.point)} m with normal ${vec(split.plane.normal)}, in that lobe's file axes). The flat face closing this part across the cut (${Number(Math.abs(split.neckArea).toPrecision(4))} m²) was made by the cut: it is synthetic, not part of the uploaded surface. Volume, mass and moments are those of the solid up to the plane; surface values on that face describe the cut, not the body's surface.`,
  }
}
