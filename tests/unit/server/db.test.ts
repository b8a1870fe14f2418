import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { eq, sql } from 'drizzle-orm'

// The local libSQL client opens extra connections while a transaction holds one; pragmas are
// per connection, so these checks run on connections opened after transactions too.
/** Drizzle wraps the driver's error; the constraint name is in its cause. */
async function expectForeignKeyFailure(p: Promise<unknown>) {
  const error = await p.then(() => null, (e: unknown) => e as { cause?: { message?: string, code?: string } })
  expect(error, 'insert should have been refused').toBeTruthy()
  expect(`${error?.cause?.code} ${error?.cause?.message}`).toMatch(/FOREIGN KEY|FOREIGNKEY/i)
}

describe('database connection settings', () => {
  const dir = mkdtempSync(join(tmpdir(), 'isthmus-db-'))
  let mod: typeof import('../../../server/utils/db')
  beforeAll(async () => {
    process.env.DATABASE_URL = `file:${join(dir, 'test.db')}`
    mod = await import('../../../server/utils/db')
    await mod.openDatabase()
  })
  afterAll(() => rmSync(dir, { recursive: true, force: true }))

  it('uses WAL, foreign keys and a busy timeout', async () => {
    const client = mod.useDBClient()
    expect((await client.execute('PRAGMA journal_mode')).rows[0]?.[0]).toBe('wal')
    expect((await client.execute('PRAGMA foreign_keys')).rows[0]?.[0]).toBe(1)
    expect(Number((await client.execute('PRAGMA busy_timeout')).rows[0]?.[0])).toBeGreaterThanOrEqual(1000)
  })

  it('keeps foreign keys on connections opened during and after a transaction', async () => {
    const db = mod.useDB()
    const { schema } = mod
    // A transaction holds one connection: concurrent statements get fresh ones.
    await db.transaction(async (tx) => {
      await tx.insert(schema.users).values({ email: 'fk@example.org', name: 'FK', role: 'viewer', passwordHash: 'x' })
      const [a, b] = await Promise.all([
        mod.useDBClient().execute('PRAGMA foreign_keys'),
        mod.useDBClient().execute('PRAGMA busy_timeout'),
      ])
      expect(a.rows[0]?.[0]).toBe(1)
      expect(Number(b.rows[0]?.[0])).toBeGreaterThanOrEqual(1000)
    })
    const orphan = db.insert(schema.passwordResets).values({ userId: 999_999, tokenHash: 'h', expiresAt: new Date() })
    await expectForeignKeyFailure(orphan)
    await Promise.all([1, 2, 3].map(async (i) => {
      await expectForeignKeyFailure(db.insert(schema.apiTokens).values({ userId: 888_000 + i, label: 'x', tokenHash: `t${i}`, prefix: 'p' }))
    }))
    const user = await db.select().from(schema.users).where(eq(schema.users.email, 'fk@example.org')).get()
    expect(user).toBeTruthy()
  })

  it('applies migrations once (a second run changes nothing)', async () => {
    const db = mod.useDB()
    const before = await db.all<{ n: number }>(sql`select count(*) as n from __drizzle_migrations`)
    const { migrate } = await import('drizzle-orm/libsql/migrator')
    await migrate(db, { migrationsFolder: 'server/db/migrations' })
    const after = await db.all<{ n: number }>(sql`select count(*) as n from __drizzle_migrations`)
    expect(after[0]!.n).toBe(before[0]!.n)
  })
})
