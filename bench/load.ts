/**
 * Mixed authenticated reads under load: autocannon, 20 connections, 200 requests/s for 30 s against
 * the built server on loopback — pages rendered on the server and API reads, half signed in with the
 * session cookie, half with an API token — first idle, then while the surface field of a generated
 * 1 310 720-face lobe is computed. Prints p50 / p99 / max latency (ms) and the rate reached, for
 * each phase, plus the server's own split of where request time goes (`Server-Timing` of a sample).
 * Target: p99 ≤ 100 ms in both phases. Run: `npm run bench -- load` (builds the app when .output
 * is missing). Set ISTHMUS_LOAD_SECONDS to shorten the phases while iterating, and
 * ISTHMUS_LOAD_PROFILE=<folder> to have the server write a V8 CPU profile there (where the time goes).
 */
import { existsSync } from 'node:fs'
import { spawnSync } from 'node:child_process'
import { availableParallelism, loadavg } from 'node:os'
import { fileURLToPath } from 'node:url'
import { ellipsoidMesh, icosphere, writePly } from '#shared/geometry'
import { Agent } from '../tests/e2e/support/http'
import { uploadLobe } from '../tests/e2e/support/lobes'
import { startServer } from '../tests/e2e/support/server'

interface LoadResult {
  latency: { p50: number, p99: number, max: number }
  requests: { average: number, total: number }
  non2xx: number
  errors: number
  timeouts: number
}
type Autocannon = (opts: Record<string, unknown>) => Promise<LoadResult>

export interface LoadFigures { p50Ms: number, p99Ms: number, maxMs: number, reqPerS: number, non2xx: number, errors: number }

const RATE = 200
const CONNECTIONS = 20

function figures(r: LoadResult): LoadFigures {
  return { p50Ms: r.latency.p50, p99Ms: r.latency.p99, maxMs: r.latency.max, reqPerS: r.requests.average, non2xx: r.non2xx, errors: r.errors + r.timeouts }
}

function line(name: string, f: LoadFigures) {
  return `${name.padEnd(30)} p50 ${f.p50Ms.toFixed(0).padStart(4)} ms   p99 ${f.p99Ms.toFixed(0).padStart(4)} ms   max ${f.maxMs.toFixed(0).padStart(5)} ms   ${f.reqPerS.toFixed(0)} req/s   non-2xx ${f.non2xx}   errors ${f.errors}`
}

export async function runLoadBench(): Promise<Record<string, LoadFigures | string>> {
  if (!existsSync('.output/server/index.mjs')) spawnSync('npx', ['nuxt', 'build'], { stdio: 'inherit' })
  const autocannon = (await import('autocannon')).default as unknown as Autocannon
  const seconds = Number(process.env.ISTHMUS_LOAD_SECONDS || 30)
  const profile = process.env.ISTHMUS_LOAD_PROFILE
  const server = await startServer({ ISTHMUS_MAX_UPLOAD_MB: '512' }, { nodeArgs: profile ? ['--cpu-prof', `--cpu-prof-dir=${profile}`] : [] })
  try {
    const admin = new Agent(server.url)
    await admin.signIn('root@example.org', 'root-password-123')
    // A few small lobes to list and read, their fields done before the idle phase.
    const ids: number[] = []
    for (let i = 0; i < 4; i++) {
      const res = await uploadLobe(admin, writePly(icosphere(3, 500 + 100 * i), 'binary_little_endian'), `load-${i}.ply`, { density: '1000', units: 'm' })
      if (res.status !== 201) throw new Error(`upload failed: ${res.status} ${res.text.slice(0, 200)}`)
      ids.push(res.json.id)
    }
    for (const id of ids) await waitForField(admin, id, 120_000)
    const token = (await admin.post('/api/account/tokens', { label: 'load' })).json.token as string
    const cookieRes = await fetch(`${server.url}/api/session`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: 'root@example.org', password: 'root-password-123' }) })
    const cookie = cookieRes.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
    const asSession = { cookie }
    const asToken = { authorization: `Bearer ${token}` }
    // The mix: two pages rendered on the server (cookie), API lists and single reads (cookie and token).
    const requests = [
      { method: 'GET', path: '/lobes', headers: asSession },
      { method: 'GET', path: '/api/lobes?limit=20', headers: asToken },
      { method: 'GET', path: `/api/lobes/${ids[0]}`, headers: asSession },
      { method: 'GET', path: '/api/account', headers: asToken },
      { method: 'GET', path: `/lobes/${ids[1]}`, headers: asSession },
      { method: 'GET', path: '/api/studies', headers: asToken },
      { method: 'GET', path: '/api/objects', headers: asSession },
      { method: 'GET', path: `/api/lobes/${ids[2]}`, headers: asToken },
      { method: 'GET', path: '/api/session', headers: asSession },
      { method: 'GET', path: '/api/members', headers: asToken },
    ]
    for (const r of requests) {
      const res = await fetch(server.url + r.path, { headers: r.headers })
      if (res.status !== 200) throw new Error(`${r.path}: ${res.status}`)
      await res.arrayBuffer()
    }
    const run = () => autocannon({ url: server.url, connections: CONNECTIONS, overallRate: RATE, duration: seconds, requests })
    // Server-side split of one sample of each kind (Server-Timing: auth, db, render).
    const timings: string[] = []
    for (const r of [requests[0]!, requests[1]!]) {
      const res = await fetch(server.url + r.path, { headers: r.headers })
      await res.arrayBuffer()
      timings.push(`${r.path}: ${res.headers.get('server-timing') ?? '(none)'}`)
    }

    const idle = figures(await run())

    // The 1 310 720-face lobe: upload, then load while its surface field runs on the workers.
    const big = writePly(ellipsoidMesh(12_000, 8_000, 6_000, 8), 'binary_little_endian')
    const up = await uploadLobe(admin, big, 'ellipsoid-1310720.ply', { density: '1000', units: 'm' })
    if (up.status !== 201) throw new Error(`big upload failed: ${up.status} ${up.text.slice(0, 200)}`)
    const stateAtStart = (await admin.get(`/api/lobes/${up.json.id}`)).json.properties.gravityJob
    const busy = figures(await run())
    const stateAtEnd = (await admin.get(`/api/lobes/${up.json.id}`)).json.properties.gravityJob

    console.info(`\n== Mixed authenticated reads, ${RATE} req/s, ${CONNECTIONS} connections, ${seconds} s each (loopback) ==`)
    console.info(`mix: ${requests.map(r => r.path).join(', ')}`)
    console.info(line('idle', idle))
    console.info(line('during the 1.31M-face field', busy))
    console.info(`field: ${stateAtStart?.status} at ${(100 * (stateAtStart?.progress ?? 0)).toFixed(0)} % when the load phase started, ${stateAtEnd?.status} at ${(100 * (stateAtEnd?.progress ?? 0)).toFixed(0)} % when it ended`)
    console.info(`load average (1 min) at the end: ${loadavg()[0]!.toFixed(1)} on ${availableParallelism()} cores (other processes on the machine count too)`)
    console.info(`target: p99 ≤ 100 ms in both phases → ${idle.p99Ms <= 100 && busy.p99Ms <= 100 ? 'met' : 'NOT met'}`)
    for (const t of timings) console.info(`server-timing ${t}`)
    return { idle, busy, fieldStateAtEnd: String(stateAtEnd?.status) }
  }
  finally {
    await server.dispose()
  }
}

async function waitForField(agent: Agent, id: number, timeoutMs: number) {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const job = (await agent.get(`/api/lobes/${id}`)).json.properties.gravityJob
    if (job?.status === 'done') return
    if (job?.status === 'failed') throw new Error(`field of lobe ${id} failed: ${job.error}`)
    if (Date.now() > deadline) throw new Error(`field of lobe ${id} still ${job?.status}`)
    await new Promise(r => setTimeout(r, 500))
  }
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) await runLoadBench()
