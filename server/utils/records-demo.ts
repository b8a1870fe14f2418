import { eq, sql } from 'drizzle-orm'
import type { Role } from '#shared/types/roles'
import { quantityDef, readQuantity, supersedeGroup } from '#shared/types/quantities'

/** Two invented records (no real object): designations in years no survey has reached. */
const DEMO_RECORDS = [
  {
    designation: '2041 KD9',
    name: 'Tessaly',
    population: 'kuiper-belt' as const,
    notes: 'Invented demo record: a cold classical twin-lobe body. Both lobe meshes are procedurally generated.',
    orbit: { a: 44.3, e: 0.037, i: 2.1 },
    tags: ['demo', 'twin-lobe'],
  },
  {
    designation: 'P/2043 TW118',
    name: 'Marrow',
    population: 'jupiter-family-comet' as const,
    notes: 'Invented demo record: a comet nucleus with a small lobe on a broad one (the demo lobes "Marrow pair — primary" and "— secondary").',
    orbit: { a: 3.46, e: 0.62, i: 7.8 },
    tags: ['demo', 'unequal-lobes'],
  },
]

/**
 * Seeds the demo records; idempotent (a record whose designation exists is left alone). When demo
 * lobes exist and a record has no values yet, one lobe's volume, mass and J2 are proposed on the
 * first record and its volume accepted, so the record page has something to show.
 */
export async function seedRecordsDemo(db: DB, members: Record<Role, number>) {
  const ids: number[] = []
  for (const r of DEMO_RECORDS) {
    const found = await db.select({ id: schema.objects.id }).from(schema.objects).where(sql`${schema.objects.designation} = ${r.designation} collate nocase`).get()
    if (found) {
      ids.push(found.id)
      continue
    }
    const [row] = await db.insert(schema.objects).values({
      designation: r.designation, name: r.name, population: r.population, notes: r.notes,
      orbitAAu: r.orbit.a, orbitE: r.orbit.e, orbitIDeg: r.orbit.i, tags: r.tags, createdBy: members.analyst,
    }).returning({ id: schema.objects.id })
    await writeTags(db, row!.id, r.tags)
    await db.insert(schema.objectFollows).values([{ objectId: row!.id, userId: members.analyst }, { objectId: row!.id, userId: members.reviewer }]).onConflictDoNothing()
    await audit(null, { actorId: null, action: 'record.demo-seeded', subjectType: 'object', subjectId: row!.id, detail: { designation: r.designation } }, db)
    ids.push(row!.id)
  }
  const first = ids[0]!
  const has = await db.select({ id: schema.attachments.id }).from(schema.attachments).where(eq(schema.attachments.objectId, first)).get()
  const lobe = await db.select().from(schema.lobes).orderBy(schema.lobes.id).get()
  if (has || !lobe) return
  const analyst = await db.select({ id: schema.users.id, name: schema.users.name }).from(schema.users).where(eq(schema.users.id, members.analyst)).get()
  if (!analyst) return
  const now = new Date()
  const provenance = lobeProvenance(lobe, analyst, now)
  const rows: (typeof schema.attachments.$inferInsert)[] = []
  for (const key of ['volume', 'mass', 'J2']) {
    let q
    try {
      q = readQuantity(quantityDef(key)!, { properties: lobe.properties, surface: lobe.surface })
    }
    catch {
      continue
    }
    rows.push({
      objectId: first, quantityKey: key, subject: 'lobe-a' as const, value: q.value, unit: q.unit, spread: q.spread,
      referenceRadius: q.referenceRadius, supersedeGroup: supersedeGroup(key, 'lobe-a', q.referenceRadius), lobeId: lobe.id,
      studyId: null, provenance, note: 'Demo proposal', proposedBy: analyst.id, proposedAt: now,
    })
  }
  if (!rows.length) return
  // Seeded values go into the audit trail like any other proposal and decision (system actor, marked demo).
  await db.transaction(async (tx) => {
    const inserted = await tx.insert(schema.attachments).values(rows).returning({ id: schema.attachments.id, key: schema.attachments.quantityKey })
    await ensureLink(tx, first, { lobeId: lobe.id }, 'attachment', analyst.id)
    for (const r of inserted) {
      await audit(null, { actorId: null, action: 'record.value-proposed', subjectType: 'attachment', subjectId: r.id, detail: { object: first, quantity: r.key, subject: 'lobe-a', lobeId: lobe.id, demo: true, proposedBy: analyst.id } }, tx)
    }
    const volume = inserted.find(r => r.key === 'volume')
    if (volume) {
      await tx.update(schema.attachments).set({ state: 'accepted', reviewedBy: members.reviewer, reviewedAt: now, reviewComment: 'Demo: mesh checked, volume accepted.' })
        .where(eq(schema.attachments.id, volume.id))
      await audit(null, { actorId: null, action: 'record.value-accepted', subjectType: 'attachment', subjectId: volume.id, detail: { object: first, quantity: 'volume', subject: 'lobe-a', demo: true, reviewedBy: members.reviewer } }, tx)
    }
  })
}
