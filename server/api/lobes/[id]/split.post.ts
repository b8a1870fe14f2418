import { join } from 'node:path'
import { eq } from 'drizzle-orm'
import { z } from 'zod'
import { idParamSchema } from '#shared/types/account'

const vec3 = z.tuple([z.number(), z.number(), z.number()])
const body = z.object({
  /**
   * Cutting plane: point in METRES in the lobe's file axes and origin (SI at the API, also for lobes
   * uploaded in km), normal any non-zero vector; default: the neck found along the long principal axis.
   */
  plane: z.object({ point: vec3, normal: vec3.refine(v => Math.hypot(...v) > 0, 'normal must not be zero') }).optional(),
})

/** Cut a whole-body mesh at its neck into two closed lobes of their own → 201 `{ plane, lobes: [A, B] }`. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'analyst')
  const { id } = paramsAs(event, idParamSchema)
  const { plane } = await readBodyAs(event, body)
  const db = useDB()
  const lobe = await db.select().from(schema.lobes).where(eq(schema.lobes.id, id)).get()
  if (!lobe) throw notFound('Lobe')
  const { derived } = uploadPaths()
  const outPaths: [string, string] = [join(derived, `split-${lobe.sha256}-${Date.now()}-a.bin`), join(derived, `split-${lobe.sha256}-${Date.now()}-b.bin`)]
  let split: { plane: unknown, neckArea: number, positiveVolume: number, negativeVolume: number }
  try {
    split = await useWorkerPool().run('split', {
      meshPath: derivedMeshPaths(lobe.sha256, lobe.units).analysis,
      // The analysis mesh is stored in metres, like the plane point: no unit conversion here.
      plane,
      outPaths,
    }, { priority: 5 })
  }
  catch (error) {
    throw toHttpError(error)
  }
  const made = []
  for (const [i, path] of outPaths.entries()) {
    made.push(await lobeFromAnalysisMesh(path, { ownerId: actor.id, name: `${lobe.name} — part ${i === 0 ? 'A' : 'B'}`, fileName: `${lobe.name}-part-${i === 0 ? 'a' : 'b'}.ply`, density: lobe.density }))
  }
  await audit(event, { actorId: actor.id, action: 'lobe.split', subjectType: 'lobe', subjectId: id, detail: { into: made.map(m => m.lobe.id) } })
  setResponseStatus(event, 201)
  return { plane: split.plane, neckArea: split.neckArea, lobes: made.map(m => lobeView(m.lobe, m.job, { id: actor.id, name: actor.name })) }
})
