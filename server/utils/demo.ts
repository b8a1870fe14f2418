import { eq } from 'drizzle-orm'
import type { Role } from '#shared/types/roles'

/** Demo accounts, created only when ISTHMUS_DEMO=1. Listed in README. */
export const DEMO_PASSWORD = 'isthmus-demo'
export const DEMO_MEMBERS: { email: string, name: string, role: Role }[] = [
  { email: 'admin@example.org', name: 'Ada Ferreira', role: 'admin' },
  { email: 'analyst@example.org', name: 'Tomas Lindqvist', role: 'analyst' },
  { email: 'reviewer@example.org', name: 'Noor Haddad', role: 'reviewer' },
  { email: 'viewer@example.org', name: 'Kenji Aoyama', role: 'viewer' },
]

const demoSeeders: ((db: DB, members: Record<Role, number>) => Promise<void>)[] = []
/** Later modules add demo content (lobes, studies, records) here. */
export function registerDemoSeeder(seeder: (db: DB, members: Record<Role, number>) => Promise<void>) {
  demoSeeders.push(seeder)
}

/** Seeds the demo team; idempotent (existing accounts and content are left as they are). */
export async function seedDemo(db: DB) {
  const ids = {} as Record<Role, number>
  for (const m of DEMO_MEMBERS) {
    const found = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, m.email)).get()
    if (found) {
      ids[m.role] = found.id
      continue
    }
    const [row] = await db.insert(schema.users).values({ ...m, passwordHash: await hashPassword(DEMO_PASSWORD) }).returning({ id: schema.users.id })
    ids[m.role] = row!.id
    await audit(null, { actorId: null, action: 'member.demo-seeded', subjectType: 'user', subjectId: row!.id, detail: { email: m.email, role: m.role } }, db)
  }
  for (const seeder of demoSeeders) await seeder(db, ids)
}
