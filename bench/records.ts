/**
 * Object-record benchmark: `npx tsx bench/records.ts` (needs a build: `npx nuxt build`).
 * Seeds 10 000 records and 100 000 attachments into a temporary database behind the BUILT server,
 * then times list, filter, sort, record and export requests on loopback (client time and the
 * server's `Server-Timing` db figure; target < 100 ms each), and runs a 200 req/s, 30 s mixed-read
 * load with autocannon reporting p50/p99 latency and errors while one contact study runs on the
 * workers. Prints figures; returns them too.
 * Set ISTHMUS_BENCH_LOAD_SECONDS to shorten the load run.
 */
import { createRequire } from 'node:module'
import { fileURLToPath } from 'node:url'
import type { Client } from '@libsql/client'
import { icosphere, writePly } from '#shared/geometry'
import { Agent } from '../tests/e2e/support/http'
import { uploadLobe } from '../tests/e2e/support/lobes'
import { startServer } from '../tests/e2e/support/server'

const RECORDS = 10_000
const PER_RECORD = 10
const POPULATIONS = ['kuiper-belt', 'jupiter-family-comet', 'near-earth', 'main-belt', 'other']
const KEYS = ['volume', 'mass', 'J2', 'C22', 'equivalentRadius', 'surfaceArea', 'contact.speed', 'contact.escapeSpeed', 'merged.J2', 'merged.spinPeriod']
const SUBJECTS = ['lobe-a', 'lobe-b', 'whole-body', 'whole-body', 'lobe-a', 'lobe-b', 'whole-body', 'whole-body', 'merged-body', 'merged-body']

function quantile(sorted: number[], q: number): number {
  return sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))]!
}

/** Seeds the benchmark records and attachments into the database of a started server. */
export async function seedRecordsBench(db: Client, admin: number) {
  // Generated inside SQLite (recursive CTEs): invented designations, seeded pseudo-random values.
  await db.batch([
    {
      sql: `with recursive n(i) as (select 1 union all select i + 1 from n where i < ${RECORDS})
            insert into objects (designation, name, population, notes, orbit_a_au, orbit_e, orbit_i_deg, tags, created_by, created_at, updated_at)
            select printf('%d %s%s%d', 2040 + (i % 60), char(65 + (i * 7) % 26), char(65 + (i * 11) % 26), i),
                   printf('Bench body %05d', (i * 7919) % ${RECORDS}),
                   json_extract('${JSON.stringify(POPULATIONS)}', printf('$[%d]', i % 5)),
                   'bench record', 1.5 + (i % 400) * 0.11, (i % 90) / 100.0, (i % 35) * 1.0,
                   case when i % 3 = 0 then '["bench","twin-lobe"]' else '["bench"]' end,
                   ${admin}, 1800000000000 + i * 1000, 1800000000000 + ((i * 104729) % ${RECORDS}) * 1000
            from n`,
      args: [],
    },
    { sql: `insert into object_tags (object_id, tag) select id, 'bench' from objects`, args: [] },
    { sql: `insert into object_tags (object_id, tag) select id, 'twin-lobe' from objects where id % 3 = 0`, args: [] },
    {
      sql: `with recursive k(j) as (select 0 union all select j + 1 from k where j < ${PER_RECORD - 1})
            insert into attachments (object_id, quantity_key, subject, value, unit, spread, reference_radius, supersede_group, provenance, note, state, proposed_by, proposed_at, reviewed_by, reviewed_at)
            select o.id, json_extract(?1, printf('$[%d]', k.j)), json_extract(?2, printf('$[%d]', k.j)),
                   cast((abs(random()) % 1000000000) / 1000.0 as text), 'kg', null, null,
                   json_extract(?1, printf('$[%d]', k.j)) || '|' || json_extract(?2, printf('$[%d]', k.j)) || '|',
                   json_object('source', 'lobe', 'lobe', json_object('id', o.id, 'sourceFileName', 'bench.obj', 'sha256', lower(hex(randomblob(32))), 'densityKgM3', 1000), 'algorithmVersion', 'bench', 'softwareVersion', 'bench'),
                   '', case (o.id + k.j) % 4 when 0 then 'accepted' when 1 then 'proposed' when 2 then 'rejected' else 'proposed' end,
                   ${admin}, 1800000000000 + o.id * 1000 + k.j, case when (o.id + k.j) % 4 in (0, 2) then ${admin} end,
                   case when (o.id + k.j) % 4 in (0, 2) then 1800000000000 + o.id * 1000 + k.j + 500 end
            from objects o, k`,
      args: [JSON.stringify(KEYS), JSON.stringify(SUBJECTS)],
    },
    { sql: 'analyze', args: [] },
  ], 'write')
}

export async function runRecordsBench(): Promise<Record<string, number>> {
  const fig: Record<string, number> = {}
  const server = await startServer()
  try {
    const db = server.sql()
    await db.execute('PRAGMA busy_timeout = 10000')
    const admin = Number((await db.execute(`select id from users where email = 'root@example.org'`)).rows[0]![0])

    let t = performance.now()
    await seedRecordsBench(db, admin)
    fig.seedMs = performance.now() - t
    const counts = await db.execute('select (select count(*) from objects), (select count(*) from attachments)')
    console.log(`seeded ${counts.rows[0]![0]} records and ${counts.rows[0]![1]} attachments in ${fig.seedMs.toFixed(0)} ms`)

    const signIn = await fetch(`${server.url}/api/session`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: 'root@example.org', password: 'root-password-123' }) })
    const cookie = signIn.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
    const someId = Math.floor(RECORDS / 2)
    const scenarios: [string, string][] = [
      ['list, designation asc (first page)', '/api/objects?limit=25'],
      ['list, deep page (offset 9 000)', '/api/objects?limit=25&offset=9000'],
      ['search q=QX (designation/name/tag substring)', '/api/objects?q=QX&limit=25'],
      ['search q=body 0123', '/api/objects?q=body%200123&limit=25'],
      ['filter population + sort name desc', '/api/objects?population=near-earth&sort=name&order=desc&limit=25'],
      ['filter tag=twin-lobe, sort updated desc', '/api/objects?tag=twin-lobe&sort=updatedAt&order=desc&limit=25'],
      ['sort by values awaiting review desc', '/api/objects?sort=proposed&order=desc&limit=25'],
      ['sort by accepted values asc, offset 5 000', '/api/objects?sort=accepted&order=asc&limit=50&offset=5000'],
      ['record page data', `/api/objects/${someId}`],
      ['export.json', `/api/objects/${someId}/export.json`],
      ['export.csv', `/api/objects/${someId}/export.csv`],
    ]
    console.log('request (30 runs each after 3 warm-ups)            client p50 / p95 / max ms   server db p50 ms')
    for (const [label, path] of scenarios) {
      const client: number[] = []
      const serverDb: number[] = []
      for (let i = 0; i < 33; i++) {
        t = performance.now()
        const res = await fetch(server.url + path, { headers: { cookie } })
        await res.arrayBuffer()
        if (res.status !== 200) throw new Error(`${path}: ${res.status}`)
        if (i < 3) continue
        client.push(performance.now() - t)
        const m = /db;dur=([\d.]+)/.exec(res.headers.get('server-timing') ?? '')
        if (m) serverDb.push(Number(m[1]))
      }
      client.sort((a, b) => a - b)
      serverDb.sort((a, b) => a - b)
      const p50 = quantile(client, 0.5)
      fig[`${label} p50 ms`] = p50
      const dbText = serverDb.length ? quantile(serverDb, 0.5).toFixed(1) : '—'
      const flag = quantile(client, 0.95) < 100 ? '' : '  ← over 100 ms'
      console.log(`${label.padEnd(52)} ${p50.toFixed(1).padStart(6)} / ${quantile(client, 0.95).toFixed(1).padStart(6)} / ${client.at(-1)!.toFixed(1).padStart(6)}   ${dbText.padStart(8)}${flag}`)
    }

    // One contact study runs on the workers during the load (two 20 480-face lobes with a spread).
    const analyst = new Agent(server.url)
    await analyst.signIn('root@example.org', 'root-password-123')
    const lobeA = (await uploadLobe(analyst, writePly(icosphere(5, 1000), 'binary_little_endian'), 'a.ply', { density: '1000', units: 'm' })).json
    const lobeB = (await uploadLobe(analyst, writePly(icosphere(5, 600), 'binary_little_endian'), 'b.ply', { density: '1000', units: 'm' })).json
    await new Promise(r => setTimeout(r, 3000)) // let their surface fields finish
    const prior = { kind: 'uniform', min: 500, max: 1500 }
    const study = (await analyst.post('/api/studies', { lobeA: lobeA.id, lobeB: lobeB.id, direction: [1, 0.2, 0], orbit: { kind: 'parabolic' }, overlapDepth: 50,
      spread: { seed: 1, samples: 400, densityA: prior, densityB: prior, coneHalfAngleDeg: 20, scale: { kind: 'fixed', value: 1 } } })).json

    const autocannon = createRequire(import.meta.url)('autocannon')
    const seconds = Number(process.env.ISTHMUS_BENCH_LOAD_SECONDS) || 30
    const mixed = scenarios.filter(([l]) => !l.startsWith('export')).map(([, p]) => p)
    mixed.push('/api/objects/123', '/api/objects/9876', `/api/objects/${someId}/export.csv`)
    const load = await autocannon({
      url: server.url,
      connections: 10,
      duration: seconds,
      overallRate: 200,
      headers: { cookie },
      requests: mixed.map(path => ({ method: 'GET', path })),
    })
    const during = (await analyst.get(`/api/studies/${study.id}`)).json
    console.log(`study ${study.id} during the load: ${during.status}, ${Math.round(during.progress * 100)} % (${during.stage})`)
    fig.loadP50Ms = load.latency.p50
    fig.loadP99Ms = load.latency.p99
    fig.loadRequests = load.requests.total
    fig.loadErrors = load.errors + load.timeouts + load.non2xx
    console.log(`load: ${seconds} s at 200 req/s over 10 connections, ${mixed.length} mixed reads: ${load.requests.total} requests, `
      + `${(load.requests.total / seconds).toFixed(0)} req/s, latency p50 ${load.latency.p50} ms, p99 ${load.latency.p99} ms, max ${load.latency.max} ms, `
      + `errors ${load.errors}, timeouts ${load.timeouts}, non-2xx ${load.non2xx}`)
  }
  finally {
    await server.dispose()
  }
  return fig
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  runRecordsBench().then(f => console.log(JSON.stringify(f)))
}
