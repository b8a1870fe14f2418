import { z } from 'zod'

const query = z.object({
  limit: z.coerce.number().int().min(1).max(500).default(100),
  /** `1`: only queued and running jobs. */
  active: z.enum(['0', '1']).default('0'),
})

/**
 * Jobs of the job engine (admin): running, then queued (with `queuePosition`, 1 = next), then the
 * latest finished; each with kind, owner, subject (lobe or study), state, stage, progress (0..1),
 * attempts and `ageSeconds` (s since queued). `engine` says where tasks run.
 */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const { limit, active } = queryAs(event, query)
  const db = useDB()
  const items = await listJobs(db, { limit, active: active === '1' })
  const engine = distributed()
    ? { kind: 'redis' as const, threads: null }
    : { kind: 'embedded' as const, ...useWorkerPool().stats() }
  return { items, engine }
})
