import { sql } from 'drizzle-orm'

/** Liveness and database check; public. */
export default defineEventHandler(async () => {
  await useDB().run(sql`select 1`)
  return { ok: true, version: useRuntimeConfig().version, db: 'ok' as const }
})
