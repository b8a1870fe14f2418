import { existsSync, mkdirSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { createClient, type Client } from '@libsql/client'
import { ConnectionPool } from '@libsql/client/sqlite3'
import { drizzle, type LibSQLDatabase } from 'drizzle-orm/libsql'
import { migrate } from 'drizzle-orm/libsql/migrator'
import { createError } from 'h3'
import * as schema from '../db/schema'
import { serverEntryDir, useConfig } from './config'

export type DB = LibSQLDatabase<typeof schema>

const BUSY_TIMEOUT_MS = 5000

/**
 * The local client keeps a pool of SQLite connections and opens a fresh one whenever a
 * transaction holds the others. Pragmas are per connection, so every connection it opens gets
 * them here, not just the first.
 */
const configured = new WeakSet<object>()
const acquireSync = ConnectionPool.prototype.acquireSync
ConnectionPool.prototype.acquireSync = function (this: ConnectionPool, forTransaction?: boolean) {
  const conn = acquireSync.call(this, forTransaction) as { exec(sql: string): unknown }
  if (!configured.has(conn)) {
    // WAL with synchronous=NORMAL: a commit no longer waits for an fsync (SQLite's driver calls
    // block the event loop, and a busy disk made every progress write cost tens of ms); the WAL is
    // synced at checkpoints, so the database stays consistent after a crash or power loss, which
    // may lose only the last commits (SQLite docs, "PRAGMA synchronous": NORMAL is safe in WAL mode).
    conn.exec(`PRAGMA foreign_keys = ON; PRAGMA busy_timeout = ${BUSY_TIMEOUT_MS}; PRAGMA synchronous = NORMAL;`)
    configured.add(conn)
  }
  return conn as ReturnType<typeof acquireSync>
}

let client: Client | undefined
let db: DB | undefined
let ready: Promise<DB> | undefined

function migrationsFolder(): string {
  const candidates = [
    useConfig().migrationsDir,
    join(serverEntryDir(), 'migrations'),
    resolve('server/db/migrations'),
  ].filter((p): p is string => !!p)
  const found = candidates.find(p => existsSync(join(p, 'meta', '_journal.json')))
  if (!found) throw new Error(`No database migrations found (looked in ${candidates.join(', ')})`)
  return found
}

/** Opens the database once, switches a file database to WAL and applies pending migrations. */
export function openDatabase(): Promise<DB> {
  if (ready) return ready
  ready = (async () => {
    const config = useConfig()
    if (config.databaseUrl.startsWith('file:')) mkdirSync(config.dataDir, { recursive: true })
    client = createClient({ url: config.databaseUrl, authToken: config.databaseAuthToken, timeout: BUSY_TIMEOUT_MS })
    if (config.databaseUrl.startsWith('file:')) await client.execute('PRAGMA journal_mode = WAL')
    db = drizzle(client, { schema })
    await migrate(db, { migrationsFolder: migrationsFolder() })
    return db
  })()
  return ready
}

/** The database, once `openDatabase()` has finished (the ready middleware awaits it for every request). */
export function useDB(): DB {
  if (!db) throw createError({ status: 503, statusText: 'Database is starting' })
  return db
}

export function useDBClient(): Client {
  if (!client) throw createError({ status: 503, statusText: 'Database is starting' })
  return client
}

export { schema }
