import { createHash } from 'node:crypto'
import { writeFile } from 'node:fs/promises'
import { join } from 'node:path'
import { eq } from 'drizzle-orm'
import { perturbedEllipsoid, writeObj, writePly } from '#shared/geometry'

/**
 * Demo lobes of an invented Kuiper-belt contact binary, "Tessaly" (a made-up designation), and of
 * an invented comet nucleus of unequal lobes, "Marrow": smooth, seeded, procedurally perturbed
 * ellipsoids, nothing observed.
 */
const DEMO_LOBES = [
  { name: 'Tessaly — large lobe', file: 'tessaly-large.ply', a: 11.2, b: 8.6, c: 7.1, subdiv: 5, seed: 17, amp: 0.06, density: 500, format: 'ply' as const },
  { name: 'Tessaly — small lobe', file: 'tessaly-small.ply', a: 8.1, b: 6.9, c: 5.4, subdiv: 5, seed: 41, amp: 0.07, density: 500, format: 'ply' as const },
  { name: 'Marrow pair — primary', file: 'marrow-primary.obj', a: 0.62, b: 0.48, c: 0.41, subdiv: 4, seed: 5, amp: 0.05, density: 1900, format: 'obj' as const },
  { name: 'Marrow pair — secondary', file: 'marrow-secondary.obj', a: 0.21, b: 0.17, c: 0.15, subdiv: 3, seed: 9, amp: 0.06, density: 1900, format: 'obj' as const },
]

export async function seedDemoLobes(db: DB, members: Record<string, number>) {
  const owner = members.analyst
  if (!owner) return
  const tmp = uploadPaths().tmp
  for (const d of DEMO_LOBES) {
    const exists = await db.select({ id: schema.lobes.id }).from(schema.lobes).where(eq(schema.lobes.name, d.name)).get()
    if (exists) continue
    const mesh = perturbedEllipsoid(d.a, d.b, d.c, d.subdiv, d.seed, d.amp)
    const bytes = d.format === 'ply' ? writePly(mesh, 'binary_little_endian') : writeObj(mesh)
    const sha256 = createHash('sha256').update(bytes).digest('hex')
    const filePath = join(tmp, `demo-${sha256}`)
    await writeFile(filePath, bytes)
    const { lobe } = await ingestLobe({ filePath, size: bytes.length, sha256, originalName: d.file, ownerId: owner, name: d.name, units: 'km', density: d.density, spinPeriodHours: d.name === 'Marrow pair — primary' ? 3.9 : undefined })
    await audit(null, { actorId: null, action: 'lobe.demo-seeded', subjectType: 'lobe', subjectId: lobe.id, detail: { name: d.name, sha256, density: d.density } }, db)
  }
}
