// Longer fuzz runs through the real upload route: `npx tsx scripts/fuzz-uploads.ts [count] [seed]`
// (builds nothing: run `npx nuxt build` first). Prints the status counts; exits 1 on any 5xx or hang.
import { Agent } from '../tests/e2e/support/http'
import { uploadLobe } from '../tests/e2e/support/lobes'
import { mutatedMeshes } from '../tests/e2e/support/mutate'
import { startServer } from '../tests/e2e/support/server'

const count = Number(process.argv[2] ?? 3000)
const seed = Number(process.argv[3] ?? 1)
const server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_MAX_UPLOAD_MB: '1' })
let bad = 0
try {
  const analyst = new Agent(server.url)
  await analyst.signIn('analyst@example.org', 'isthmus-demo')
  const statuses = new Map<number, number>()
  for (const { bytes, name } of mutatedMeshes(count, seed)) {
    const res = await Promise.race([uploadLobe(analyst, bytes, name, { density: '1000', units: 'm' }), new Promise<never>((_, rej) => setTimeout(() => rej(new Error('upload hung for 30 s')), 30_000))])
    statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1)
    if (res.status >= 500) bad++
  }
  console.info(`fuzzed ${count} uploads (seed ${seed}):`, Object.fromEntries([...statuses].sort()))
  if ((await analyst.get('/api/health')).status !== 200) bad++
}
finally {
  await server.dispose()
}
process.exit(bad ? 1 : 0)
