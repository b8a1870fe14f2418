import { eq, sql } from 'drizzle-orm'
import type { Role } from '#shared/types/roles'
import { studyInputSchema } from '#shared/types/studies'

/**
 * The demo's contact study: the two invented "Tessaly" lobes meeting on a bound mutual orbit, with a
 * settling depth, a neck sweep, a pathway screen and a small seeded spread, linked to the demo
 * record so its page shows the joined body. Idempotent: seeded once, when no study of the pair
 * exists. ISTHMUS_DEMO_STUDY=0 leaves it out (the end-to-end tests do, to keep their counts).
 */
export async function seedDemoStudy(db: DB, members: Record<Role, number>) {
  if (!useConfig().demoStudy || !members.analyst) return
  const lobe = (name: string) => db.select().from(schema.lobes).where(eq(schema.lobes.name, name)).get()
  const [a, b] = [await lobe('Tessaly — large lobe'), await lobe('Tessaly — small lobe')]
  if (!a || !b) return
  const existing = await db.select({ id: schema.studies.id }).from(schema.studies)
    .where(sql`${schema.studies.lobeAId} = ${a.id} and ${schema.studies.lobeBId} = ${b.id}`).get()
  if (existing) return
  const input = studyInputSchema.parse({
    title: 'Demo: the Tessaly lobes settling together on a bound orbit',
    lobeA: a.id,
    lobeB: b.id,
    direction: [1, 0, 0],
    orbit: { kind: 'bound', semiMajorAxis: 30_000, eccentricity: 0.5 },
    overlapDepth: 600,
    screen: { inclinationDeg: 20, heliocentricSemiMajorAxisAu: 44.3, heliocentricEccentricity: 0.037 },
    spread: {
      seed: 2041,
      samples: 32,
      coneHalfAngleDeg: 15,
      // centred on the lobes' 500 kg m⁻³, so that the spread brackets the nominal run
      densityA: { kind: 'uniform', min: 300, max: 700 },
      densityB: { kind: 'uniform', min: 300, max: 700 },
      scale: { kind: 'normal', mean: 1, std: 0.02 },
    },
  })
  const study = await createStudy(db, members.analyst, a, b, input)
  await audit(null, { actorId: null, action: 'study.demo-seeded', subjectType: 'study', subjectId: study.id, detail: { lobeA: a.id, lobeB: b.id } }, db)
  const record = await db.select({ id: schema.objects.id }).from(schema.objects).where(sql`${schema.objects.designation} = '2041 KD9' collate nocase`).get()
  if (record) await ensureLink(db, record.id, { studyId: study.id }, 'manual', members.analyst)
}
