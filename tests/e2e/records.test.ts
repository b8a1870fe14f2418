import { significantText } from '#shared/utils/number-text'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { boxMesh, writeObj } from '#shared/geometry'
import { Agent, latestMailTo, linkIn } from './support/http'
import { uploadLobe } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

type Who = 'admin' | 'analyst' | 'reviewer' | 'viewer'

/** Invented study result (test data, not physics): numbers chosen to expose any rounding. */
const STUDY_RESULT = {
  contact: { speed: 0.1 + 0.2, escapeSpeed: 0.7071067811865476, speedRatio: (0.1 + 0.2) / 0.7071067811865476, impactAngleFromNormalDeg: 33.33333333333333 },
  neck: { equivalentRadius: Math.PI * 67.5, area: 141_000.5 },
  merged: { J2: 0.37 / 3, C22: Math.SQRT2 / 31, referenceRadius: 1234.5678901234567, spinPeriod: 36000.123456789, breakupSpinPeriod: 14_000.5 },
  spread: {
    seed: 7, samples: 64, contacts: 60, priors: 'density uniform 400–900 kg m⁻³',
    speed: { min: 0.25, median: 0.3, max: 0.35000000000000003, mean: 0.3, std: 0.02, n: 60 },
    mergedJ2: { min: 0.1, median: 0.12, max: 0.14, mean: 0.12, std: 0.01, n: 60 },
    // Drawn over a density range the nominal run did not use: centred well above the nominal 0.7071… m s⁻¹.
    escapeSpeed: { min: 0.6, median: 0.9, max: 1.2, mean: 0.91, std: 0.1, n: 60 },
    spinPeriod: null, neckRadius: null,
  },
}
/** The stored inputs of that study (the shape `POST /api/studies` stores, densities resolved). */
const STUDY_INPUT = {
  title: 'slow approach', densityA: 1500, densityB: 1400, massModel: 'conserve-mass', orientationB: [0.5, 0.5, 0.5, 0.5], direction: [1, 0, 0],
  orbit: { kind: 'hyperbolic', vInfinity: 0.1, pericentre: 0 }, spinA: 'synchronous', spinB: 'none', overlapDepth: 250, sweepSteps: 0,
  spread: { seed: 7, samples: 64, densityA: { kind: 'uniform', min: 400, max: 900 }, densityB: { kind: 'fixed', value: 1400 }, coneHalfAngleDeg: 10, scale: { kind: 'fixed', value: 1 }, neck: true },
}

/** Minimal CSV reader for RFC 4180 text (quoted cells, doubled quotes). */
function parseCsv(text: string): string[][] {
  const rows: string[][] = []
  let row: string[] = []
  let cell = ''
  let quoted = false
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') { cell += '"'; i++ }
      else if (c === '"') quoted = false
      else cell += c
    }
    else if (c === '"') quoted = true
    else if (c === ',') { row.push(cell); cell = '' }
    else if (c === '\r') continue
    else if (c === '\n') { row.push(cell); rows.push(row); row = []; cell = '' }
    else cell += c
  }
  return rows
}

describe('object records: attach, review, supersede, export, mail', () => {
  let server: RunningServer
  const as = {} as Record<Who, Agent>
  const ids = {} as Record<Who | 'reviewer2', number>
  let reviewer2: Agent
  let lobeDense: any
  let lobeLight: any
  let lobeOther: any
  let studyId: number
  let recordId: number

  async function count(sql: string, args: (string | number)[] = []): Promise<number> {
    const r = await server.sql().execute({ sql, args })
    return Number(r.rows[0]![0])
  }

  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '200' })
    // The server writes while surface jobs run: wait for its locks instead of failing.
    await server.sql().execute('PRAGMA busy_timeout = 10000')
    for (const who of ['admin', 'analyst', 'reviewer', 'viewer'] as const) {
      as[who] = new Agent(server.url)
      ids[who] = (await as[who].signIn(`${who}@example.org`, 'isthmus-demo')).id
    }
    // A second reviewer, invited and joined through the mail drop.
    expect((await as.admin.post('/api/invitations', { email: 'second.reviewer@example.org', role: 'reviewer' })).status).toBe(201)
    const link = linkIn((await latestMailTo(as.admin, 'second.reviewer@example.org')).text)
    reviewer2 = new Agent(server.url)
    expect((await reviewer2.post(new URL(link).pathname.replace('/join/', '/api/join/'), { name: 'Second Reviewer', password: 'second-reviewer-1' })).status).toBe(200)
    ids.reviewer2 = (await reviewer2.signIn('second.reviewer@example.org', 'second-reviewer-1')).id

    // Real lobes through the upload route: one box at two densities, and a different box.
    const box = writeObj(boxMesh(2, 1, 0.5))
    const up = async (bytes: Uint8Array, name: string, density: string) => {
      const res = await uploadLobe(as.analyst, bytes, name, { density, units: 'km' })
      expect(res.status, res.text).toBe(201)
      return res.json
    }
    lobeDense = await up(box, 'slab-dense.obj', '1500')
    lobeLight = await up(box, 'slab-light.obj', '800')
    lobeOther = await up(writeObj(boxMesh(3, 1, 1)), 'long.obj', '1500')

    // A finished study row inserted directly, with values picked to test float64 round trips
    // (0.1 + 0.2, π·67.5, √2/31) through attachments and exports; the real study → record path
    // runs in records-acceptance.test.ts and records-flow.test.ts.
    const ins = await server.sql().execute({
      sql: `insert into studies (owner_id, lobe_a_id, lobe_b_id, title, input, cache_key, status, progress, result, algorithm_version, finished_at)
            values (?, ?, ?, ?, ?, ?, 'done', 1, ?, 'isthmus-geometry test', ?) returning id`,
      args: [ids.analyst, lobeDense.id, lobeOther.id, 'slow approach', JSON.stringify({ ...STUDY_INPUT, lobeA: lobeDense.id, lobeB: lobeOther.id }), 'k1', JSON.stringify(STUDY_RESULT), Date.now()],
    })
    studyId = Number(ins.rows[0]![0])
  })
  afterAll(() => server?.dispose())

  it('creates records with the shared schema: 201 { id }, 409 on a taken designation, 422 with issues, 403 for viewers', async () => {
    const res = await as.analyst.post('/api/objects', { designation: '2047 RZ3', name: 'Test lobe pair', population: 'kuiper-belt', tags: ['Twin', 'test'], orbit: { semiMajorAxisAu: 43.9, eccentricity: 0.05, inclinationDeg: 3.2 } })
    expect(res.status, res.text).toBe(201)
    expect(Object.keys(res.json)).toEqual(['id'])
    recordId = res.json.id
    const rec = (await as.viewer.get(`/api/objects/${recordId}`)).json
    expect(rec.object).toMatchObject({ designation: '2047 RZ3', population: 'kuiper-belt', tags: ['test', 'twin'], orbit: { semiMajorAxisAu: 43.9, eccentricity: 0.05, inclinationDeg: 3.2 } })
    expect(rec.following).toBe(false)
    expect((await as.analyst.get(`/api/objects/${recordId}`)).json.following).toBe(true)

    expect((await as.analyst.post('/api/objects', { designation: '2047 rz3', name: 'Same' })).status).toBe(409)
    const bad = await as.analyst.post('/api/objects', { designation: '', name: 'x', orbit: { semiMajorAxisAu: 2, eccentricity: 1.2, inclinationDeg: 200 } })
    expect(bad.status).toBe(422)
    const paths = bad.json.data.issues.map((i: { path: string }) => i.path)
    expect(paths).toEqual(expect.arrayContaining(['designation', 'orbit.eccentricity', 'orbit.inclinationDeg']))
    expect((await as.viewer.post('/api/objects', { designation: '2047 RZ4', name: 'x' })).status).toBe(403)
    expect((await as.reviewer.post('/api/objects', { designation: '2047 RZ4', name: 'x' })).status).toBe(403)

    const patched = await as.analyst.patch(`/api/objects/${recordId}`, { notes: 'edited', tags: ['twin'], lobes: [lobeOther.id] })
    expect(patched.status, patched.text).toBe(200)
    expect(patched.json).toMatchObject({ notes: 'edited', tags: ['twin'] })
    expect((await as.analyst.patch(`/api/objects/${recordId}`, { lobes: [99_999_999] })).status).toBe(422)
    const links = (await as.viewer.get(`/api/objects/${recordId}`)).json.links
    expect(links.lobes).toEqual([{ id: lobeOther.id, name: lobeOther.name, via: 'manual' }])
  })

  it('lists records filtered, sorted and paged in the database', async () => {
    const pops = ['near-earth', 'main-belt', 'kuiper-belt'] as const
    for (let i = 0; i < 12; i++) {
      const res = await as.analyst.post('/api/objects', { designation: `2050 LT${String(i).padStart(2, '0')}`, name: `List ${String.fromCharCode(76 - i)}`, population: pops[i % 3], tags: i % 4 === 0 ? ['listing', 'quad'] : ['listing'] })
      expect(res.status).toBe(201)
    }
    const all = await as.viewer.get('/api/objects?q=2050%20LT&limit=5&offset=0&sort=designation&order=asc')
    expect(all.status).toBe(200)
    expect(all.json.total).toBe(12)
    expect(all.json.items.map((r: { designation: string }) => r.designation)).toEqual(['2050 LT00', '2050 LT01', '2050 LT02', '2050 LT03', '2050 LT04'])
    expect(all.headers.get('server-timing')).toMatch(/db;dur=[\d.]+/)
    const page3 = await as.viewer.get('/api/objects?q=2050%20LT&limit=5&offset=10&sort=designation&order=asc')
    expect(page3.json.items.map((r: { designation: string }) => r.designation)).toEqual(['2050 LT10', '2050 LT11'])
    const byName = await as.viewer.get('/api/objects?q=list&sort=name&order=desc&limit=3')
    expect(byName.json.items.map((r: { name: string }) => r.name)).toEqual(['List L', 'List K', 'List J'])
    const neo = await as.viewer.get('/api/objects?q=2050&population=near-earth&limit=50')
    expect(neo.json.total).toBe(4)
    expect(neo.json.items.every((r: { population: string }) => r.population === 'near-earth')).toBe(true)
    const quad = await as.viewer.get('/api/objects?tag=quad&limit=50')
    expect(quad.json.items.map((r: { designation: string }) => r.designation).sort()).toEqual(['2050 LT00', '2050 LT04', '2050 LT08'])
    // q also matches tags; LIKE wildcards in q are literal.
    expect((await as.viewer.get('/api/objects?q=quad')).json.total).toBe(3)
    expect((await as.viewer.get('/api/objects?q=%25')).json.total).toBe(0)
    expect((await as.viewer.get('/api/objects?sort=bogus')).status).toBe(422)
    expect((await as.viewer.get('/api/objects?limit=0')).status).toBe(422)
  })

  it('previews and attaches lobe values as frozen snapshots with provenance, and mails reviewers who want each proposal', async () => {
    expect((await as.reviewer.post(`/api/objects/${recordId}/follow`)).json).toEqual({ following: true })
    // The second reviewer turned proposal mails off.
    expect((await reviewer2.post(`/api/objects/${recordId}/follow`)).status).toBe(200)
    expect((await reviewer2.patch('/api/account/record-mail', { proposals: false })).json).toEqual({ proposals: 'none', decisions: true, comments: true })

    const preview = await as.analyst.get(`/api/attachments/preview?lobe=${lobeDense.id}`)
    expect(preview.status).toBe(200)
    const mass = preview.json.items.find((i: { key: string }) => i.key === 'mass')
    expect(mass).toMatchObject({ available: true, value: lobeDense.properties.mass, unit: 'kg' })

    const res = await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeDense.id, subject: 'lobe-a', quantities: ['volume', 'mass', 'J2', 'principalMoments'], note: 'first pass' })
    expect(res.status, res.text).toBe(201)
    const byKey = Object.fromEntries(res.json.items.map((a: any) => [a.quantityKey, a]))
    expect(byKey.volume.value).toBe(lobeDense.properties.volume)
    expect(byKey.mass).toMatchObject({ value: lobeDense.properties.mass, unit: 'kg', subject: 'lobe-a', state: 'proposed', referenceRadius: null })
    expect(byKey.J2).toMatchObject({ value: lobeDense.properties.J2, unit: '1', referenceRadius: lobeDense.properties.referenceRadius })
    expect(byKey.principalMoments.value).toEqual(lobeDense.properties.principalMoments)
    expect(byKey.mass.provenance).toMatchObject({
      source: 'lobe',
      lobe: { id: lobeDense.id, sourceFileName: 'slab-dense.obj', sha256: lobeDense.sha256, densityKgM3: 1500 },
      algorithmVersion: lobeDense.algorithmVersion,
      attachedBy: { id: ids.analyst },
    })
    // Box 2 × 1 × 0.5 km: V = 1 km³ = 1e9 m³ (closed form), M = ρV.
    expect(byKey.volume.value).toBeCloseTo(1e9, -1)
    expect(byKey.mass.value / byKey.volume.value).toBeCloseTo(1500, 9)

    // one mail per proposed value, the subject first
    const mail = await latestMailTo(as.admin, 'reviewer@example.org', 5000, m => / — lobe A: Mass \(#\d+\)$/.test(m.subject))
    expect(mail.subject).toContain('2047 RZ3')
    // 6 significant digits in the mail, full precision on the record page and in its exports
    expect(mail.text).toContain(significantText(lobeDense.properties.mass, 6))
    expect(mail.text).toContain('rounded to 6 significant digits')
    expect(mail.text).toContain(`/objects/${recordId}`)
    expect(await count(`select count(*) from mail_messages where envelope_to like '%second.reviewer@example.org%' and subject like '%proposed%'`)).toBe(0)
    // The record is linked to the lobe because of the attachment.
    const rec = (await as.viewer.get(`/api/objects/${recordId}`)).json
    expect(rec.links.lobes).toEqual(expect.arrayContaining([{ id: lobeDense.id, name: lobeDense.name, via: 'attachment' }]))
    expect(await count(`select count(*) from audit_events where action = 'record.value-proposed' and detail like ?`, [`%"object":${recordId}%`])).toBe(4)
  })

  it('refuses quantities of the wrong source, unknown keys, unknown lobes and unfinished studies with 422', async () => {
    const wrong = await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeDense.id, subject: 'lobe-a', quantities: ['contact.speed'] })
    expect(wrong.status).toBe(422)
    expect(wrong.json.data.issues[0].path).toBe('quantities.0')
    expect((await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeDense.id, subject: 'lobe-a', quantities: ['nope'] })).status).toBe(422)
    expect((await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: 99_999_999, subject: 'lobe-a', quantities: ['mass'] })).status).toBe(422)
    expect((await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeDense.id, study: studyId, quantities: ['mass'] })).status).toBe(422)
    const queued = await server.sql().execute({ sql: `insert into studies (owner_id, lobe_a_id, lobe_b_id, input, cache_key, status, algorithm_version) values (?, ?, ?, '{}', 'k2', 'queued', 'v') returning id`, args: [ids.analyst, lobeDense.id, lobeOther.id] })
    const notDone = await as.analyst.post(`/api/objects/${recordId}/attachments`, { study: Number(queued.rows[0]![0]), subject: 'lobe-pair', quantities: ['contact.speed'] })
    expect(notDone.status).toBe(422)
    expect(notDone.json.data.code).toBe('study-not-done')
    expect((await as.reviewer.post(`/api/objects/${recordId}/attachments`, { lobe: lobeDense.id, quantities: ['mass'] })).status).toBe(403)
    expect((await as.analyst.post(`/api/objects/99999999/attachments`, { lobe: lobeDense.id, subject: 'lobe-a', quantities: ['mass'] })).status).toBe(404)
  })

  it('refuses (409) a value identical to one still awaiting review, even from two requests at once, and stores nothing', async () => {
    const body = { lobe: lobeDense.id, subject: 'lobe-b', quantities: ['surfaceArea'] }
    const before = await count('select count(*) from attachments where object_id = ?', [recordId])
    // A double click: two identical requests in flight together; the write transactions run one after the other.
    const [a, b] = await Promise.all([as.analyst.post(`/api/objects/${recordId}/attachments`, body), as.analyst.post(`/api/objects/${recordId}/attachments`, body)])
    expect([a.status, b.status].sort(), `${a.text} / ${b.text}`).toEqual([201, 409])
    const first = a.status === 201 ? a : b
    const again = await as.analyst.post(`/api/objects/${recordId}/attachments`, { ...body, quantities: ['surfaceArea', 'volume'] })
    expect(again.status).toBe(409)
    expect(again.json.message).toContain(`#${first.json.items[0].id} Surface area (lobe B)`)
    expect(again.json.data).toMatchObject({ code: 'duplicate-proposal', attachments: [first.json.items[0].id] })
    expect(await count('select count(*) from attachments where object_id = ?', [recordId])).toBe(before + 1)
    // Another subject, or the same value once decided, is a new proposal.
    expect((await as.analyst.post(`/api/objects/${recordId}/attachments`, { ...body, subject: 'lobe-a' })).status).toBe(201)
    expect((await as.reviewer.post(`/api/attachments/${first.json.items[0].id}/review`, { decision: 'reject', comment: 'Wrong lobe.' })).status).toBe(200)
    const after = await as.analyst.post(`/api/objects/${recordId}/attachments`, body)
    expect(after.status, after.text).toBe(201)
    expect((await as.reviewer.post(`/api/attachments/${after.json.items[0].id}/review`, { decision: 'reject', comment: 'Still the wrong lobe.' })).status).toBe(200)
  })

  it('lists the records awaiting a reviewer\'s review and an analyst\'s own proposals by state', async () => {
    const rec = (await as.viewer.get(`/api/objects/${recordId}`)).json
    const proposed = rec.attachments.filter((a: any) => a.state === 'proposed')
    expect(proposed.length).toBeGreaterThan(0)
    const queue = await as.reviewer.get('/api/objects?awaiting=review&limit=200')
    expect(queue.status).toBe(200)
    const row = queue.json.items.find((r: any) => r.id === recordId)
    expect(row).toMatchObject({ awaitingCount: proposed.length, designation: '2047 RZ3' })
    expect(Date.parse(row.oldestAwaitingAt)).toBe(Math.min(...proposed.map((a: any) => Date.parse(a.proposedAt))))
    // Only records with something awaiting review are listed.
    for (const r of queue.json.items) expect(r.awaitingCount, r.designation).toBeGreaterThan(0)
    expect(queue.json.items.some((r: any) => r.designation === '2050 LT00')).toBe(false)
    // The analyst proposed them: not awaiting the analyst's own review, but listed under their proposals.
    expect((await as.analyst.get('/api/objects?awaiting=review&limit=200')).json.items.some((r: any) => r.id === recordId)).toBe(false)
    const mine = (await as.analyst.get('/api/objects?awaiting=mine&limit=200')).json.items.find((r: any) => r.id === recordId)
    const byState = (st: string) => rec.attachments.filter((a: any) => a.state === st && a.proposedBy?.id === ids.analyst).length
    expect(mine.mine).toEqual({ proposed: byState('proposed'), accepted: byState('accepted'), rejected: byState('rejected'), superseded: byState('superseded') })
    expect(mine.mine.rejected).toBeGreaterThan(0)
    expect((await as.viewer.get('/api/objects?awaiting=everything')).status).toBe(422)
  })

  it('lobe exports state the spin period the surface fields used, or that the lobe is not rotating', async () => {
    const spun = await uploadLobe(as.analyst, writeObj(boxMesh(1, 1, 1)), 'spun.obj', { density: '1000', units: 'km', spinPeriodHours: '4' })
    expect(spun.status, spun.text).toBe(201)
    for (const [lobe, seconds] of [[spun.json, 14400], [lobeDense, null]] as const) {
      const csv = parseCsv((await as.viewer.get(`/api/lobes/${lobe.id}/export.csv`)).text)
      const col = (n: string) => csv[0]!.indexOf(n)
      for (const r of csv.slice(1)) {
        expect(r[col('spin_period_s')]).toBe(seconds === null ? '' : String(seconds))
        expect(r[col('spin')]).toBe(seconds === null ? 'not rotating' : 'rotating')
      }
      const json = (await as.viewer.get(`/api/lobes/${lobe.id}/export.json`)).json
      expect(json.provenance.spinPeriodS).toBe(seconds)
      expect(json.provenance.spin).toMatch(seconds === null ? /^not rotating$/ : /^rotating, period 14400 s \(4 h\)$/)
    }
  })

  it('lets nobody accept a value they proposed (four eyes); rejecting your own proposal withdraws it', async () => {
    // an admin may both propose and review: not the same value (a record of its own, so that the
    // other tests' counts stay as they are)
    const own = await as.admin.post('/api/objects', { designation: 'ZZ-FOUR-EYES', name: 'Four eyes' })
    expect(own.status, own.text).toBe(201)
    const mine = await as.admin.post(`/api/objects/${own.json.id}/attachments`, { lobe: lobeDense.id, subject: 'whole-body', quantities: ['surfaceArea', 'volume'] })
    expect(mine.status, mine.text).toBe(201)
    const [area, volume] = mine.json.items
    const self = await as.admin.post(`/api/attachments/${area.id}/review`, { decision: 'accept', comment: 'my own' })
    expect(self.status).toBe(403)
    expect(self.json.message).toMatch(/You proposed this value: another reviewer must accept it/)
    expect((await as.reviewer.post(`/api/attachments/${area.id}/review`, { decision: 'accept', comment: 'checked by another' })).status).toBe(200)
    expect((await as.admin.post(`/api/attachments/${volume.id}/review`, { decision: 'reject', comment: 'withdrawn' })).status).toBe(200)
  })

  it('tells when a source lobe changed after a value was attached; the value itself stays as frozen', async () => {
    const lobe = await uploadLobe(as.analyst, writeObj(boxMesh(1, 2, 1)), 'drifting.obj', { density: '1000', units: 'km' })
    expect(lobe.status, lobe.text).toBe(201)
    const own = await as.analyst.post('/api/objects', { designation: 'ZZ-DRIFT', name: 'Drift' })
    const att = await as.analyst.post(`/api/objects/${own.json.id}/attachments`, { lobe: lobe.json.id, subject: 'whole-body', quantities: ['mass'] })
    expect(att.status, att.text).toBe(201)
    const before = (await as.viewer.get(`/api/objects/${own.json.id}`)).json.attachments[0]
    expect(before.sourceChanges).toEqual([])
    expect((await as.analyst.patch(`/api/lobes/${lobe.json.id}`, { density: 1200 })).status).toBe(200)
    const after = (await as.viewer.get(`/api/objects/${own.json.id}`)).json.attachments[0]
    expect(after.sourceChanges).toEqual([`the lobe (#${lobe.json.id} drifting): density 1000 → 1200 kg m⁻³`])
    // the audit trail keeps the old value beside the new one
    const audit = (await as.admin.get('/api/audit?limit=20')).json.items.find((e: { action: string, subjectId: string }) => e.action === 'lobe.updated' && e.subjectId === String(lobe.json.id))
    expect(audit.detail).toMatchObject({ density: 1200, before: { density: 1000 } })
    // and the audit page links the lobe
    expect((await as.admin.get('/admin/audit')).text).toContain(`<a href="/lobes/${lobe.json.id}"`)
    // 2 km³ at 1000 kg m⁻³, as attached (box 1 × 2 × 1 km)
    expect(after.value).toBe(before.value)
    expect(after.value).toBeCloseTo(2e9 * 1000, -3)
  })

  it('accepts and rejects with a comment, mails the analyst, and answers 409 to a second decision', async () => {
    const rec = (await as.viewer.get(`/api/objects/${recordId}`)).json
    const pick = (k: string) => rec.attachments.find((a: any) => a.quantityKey === k && a.state === 'proposed')
    const mass = pick('mass')
    const volume = pick('volume')
    expect((await as.analyst.post(`/api/attachments/${mass.id}/review`, { decision: 'accept' })).status).toBe(403)
    expect((await as.reviewer.post(`/api/attachments/${volume.id}/review`, { decision: 'reject' })).status).toBe(422)
    const ok = await as.reviewer.post(`/api/attachments/${mass.id}/review`, { decision: 'accept', comment: 'Mesh and density checked.' })
    expect(ok.status, ok.text).toBe(200)
    expect(ok.json.attachment).toMatchObject({ state: 'accepted', reviewedBy: { id: ids.reviewer }, reviewComment: 'Mesh and density checked.' })
    const mail = await latestMailTo(as.admin, 'analyst@example.org')
    expect(mail.subject).toMatch(/2047 RZ3 was accepted/)
    expect(mail.text).toContain('Mesh and density checked.')

    const again = await as.reviewer.post(`/api/attachments/${mass.id}/review`, { decision: 'reject', comment: 'changed my mind' })
    expect(again.status).toBe(409)
    expect((await as.reviewer.post(`/api/attachments/${volume.id}/review`, { decision: 'reject', comment: 'Volume needs the patched mesh.' })).status).toBe(200)
    expect((await as.admin.post(`/api/attachments/${volume.id}/review`, { decision: 'accept' })).status).toBe(409)
    expect((await as.reviewer.post('/api/attachments/99999999/review', { decision: 'accept' })).status).toBe(404)

    const after = (await as.viewer.get(`/api/objects/${recordId}`)).json
    expect(after.currentValues.map((v: any) => v.id)).toEqual([mass.id])
    expect(after.comments[mass.id]).toEqual([expect.objectContaining({ kind: 'decision', body: 'Mesh and density checked.' })])
    expect(after.history.filter((h: any) => h.attachmentId === volume.id).map((h: any) => h.kind)).toEqual(['rejected', 'proposed'])
  })

  it('supersedes the accepted value of the same quantity, subject and reference radius, keeping the history', async () => {
    const first = (await as.viewer.get(`/api/objects/${recordId}`)).json.currentValues.find((v: any) => v.quantityKey === 'mass')
    const res = await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeLight.id, subject: 'lobe-a', quantities: ['mass', 'J2'] })
    expect(res.status).toBe(201)
    const [mass2, j2Light] = res.json.items
    // J2 of another mesh (another reference radius): a different group, so it does not supersede.
    const other = await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeOther.id, subject: 'lobe-a', quantities: ['J2'] })
    const j2Dense = (await as.viewer.get(`/api/objects/${recordId}`)).json.attachments.find((a: any) => a.quantityKey === 'J2' && a.source.id === lobeDense.id)
    for (const id of [mass2.id, j2Dense.id, j2Light.id, other.json.items[0].id]) {
      const r = await as.reviewer.post(`/api/attachments/${id}/review`, { decision: 'accept' })
      expect(r.status, r.text).toBe(200)
    }
    const rec = (await as.viewer.get(`/api/objects/${recordId}`)).json
    const currentMass = rec.currentValues.filter((v: any) => v.quantityKey === 'mass')
    expect(currentMass.map((v: any) => v.id)).toEqual([mass2.id])
    expect(currentMass[0].value).toBe(lobeLight.properties.mass)
    const old = rec.attachments.find((a: any) => a.id === first.id)
    expect(old).toMatchObject({ state: 'superseded', supersededBy: mass2.id, value: lobeDense.properties.mass })
    expect(rec.history.filter((h: any) => h.attachmentId === first.id).map((h: any) => h.kind)).toEqual(['superseded', 'accepted', 'proposed'])
    // J2 of the same mesh at another density: same R → supersedes; J2 of another mesh: other R → both current.
    expect(lobeOther.properties.referenceRadius).not.toBe(lobeDense.properties.referenceRadius)
    const j2 = rec.currentValues.filter((v: any) => v.quantityKey === 'J2').map((v: any) => v.id).sort()
    expect(j2).toEqual([j2Light.id, other.json.items[0].id].sort())
    expect(rec.attachments.find((a: any) => a.id === j2Dense.id).state).toBe('superseded')
    // Nothing deleted; the database holds at most one accepted value per group.
    expect(await count('select count(*) from attachments where object_id = ?', [recordId])).toBe(rec.attachments.length)
    expect(await count(`select count(*) from (select supersede_group from attachments where object_id = ? and state = 'accepted' group by supersede_group having count(*) > 1)`, [recordId])).toBe(0)
    expect(await count(`select count(*) from audit_events where action = 'record.value-superseded' and subject_id = ?`, [String(first.id)])).toBe(1)
  })

  it('lets exactly one of two concurrent reviewers decide an attachment; nothing lost or duplicated', async () => {
    for (let round = 0; round < 6; round++) {
      const res = await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeOther.id, subject: 'lobe-b', quantities: ['volume'] })
      const id = res.json.items[0].id
      const [a, b] = await Promise.all([
        as.reviewer.post(`/api/attachments/${id}/review`, { decision: 'accept', comment: `first ${round}` }),
        reviewer2.post(`/api/attachments/${id}/review`, { decision: 'reject', comment: `second ${round}` }),
      ])
      expect([a.status, b.status].sort(), `${a.text} / ${b.text}`).toEqual([200, 409])
      const winner = a.status === 200 ? { who: ids.reviewer, state: 'accepted', comment: `first ${round}` } : { who: ids.reviewer2, state: 'rejected', comment: `second ${round}` }
      const row = (await server.sql().execute({ sql: 'select state, reviewed_by, review_comment from attachments where id = ?', args: [id] })).rows[0]!
      expect({ state: row.state, by: Number(row.reviewed_by), comment: row.review_comment }).toEqual({ state: winner.state, by: winner.who, comment: winner.comment })
      expect(await count(`select count(*) from attachment_comments where attachment_id = ? and kind = 'decision'`, [id])).toBe(1)
      expect(await count(`select count(*) from audit_events where action in ('record.value-accepted', 'record.value-rejected') and subject_id = ?`, [String(id)])).toBe(1)
    }
    // Two proposals of the same group accepted at once: both succeed, exactly one stays current.
    // (From two lobes: the same value from the same lobe twice would be refused while awaiting review.)
    const res = await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeOther.id, subject: 'whole-body', quantities: ['surfaceArea'] })
    const res2 = await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeDense.id, subject: 'whole-body', quantities: ['surfaceArea'] })
    expect([res.status, res2.status], `${res.text} ${res2.text}`).toEqual([201, 201])
    const [x, y] = await Promise.all([
      as.reviewer.post(`/api/attachments/${res.json.items[0].id}/review`, { decision: 'accept' }),
      reviewer2.post(`/api/attachments/${res2.json.items[0].id}/review`, { decision: 'accept' }),
    ])
    expect([x.status, y.status]).toEqual([200, 200])
    const states = (await server.sql().execute({ sql: `select state from attachments where id in (?, ?) order by state`, args: [res.json.items[0].id, res2.json.items[0].id] })).rows.map(r => r.state)
    expect(states).toEqual(['accepted', 'superseded'])
  })

  it('attaches study values with spread, and exports JSON = record page data, CSV at full precision, citation text', async () => {
    const pair = await as.analyst.post(`/api/objects/${recordId}/attachments`, { study: studyId, subject: 'lobe-pair', quantities: ['contact.speed', 'contact.escapeSpeed'] })
    expect(pair.status, pair.text).toBe(201)
    // A study quantity must be proposed with the subject it describes.
    const mixed = await as.analyst.post(`/api/objects/${recordId}/attachments`, { study: studyId, subject: 'merged-body', quantities: ['merged.J2', 'contact.speedRatio'] })
    expect(mixed.status).toBe(422)
    expect(mixed.json.data.issues).toEqual([{ path: 'quantities.1', message: expect.stringMatching(/describes the lobe pair \(approach\), not the merged body/) }])
    const merged = await as.analyst.post(`/api/objects/${recordId}/attachments`, { study: studyId, subject: 'merged-body', quantities: ['merged.J2', 'merged.spinPeriod'] })
    expect(merged.status, merged.text).toBe(201)
    const res = { json: { items: [...pair.json.items, ...merged.json.items] } }
    const byKey = Object.fromEntries(res.json.items.map((a: any) => [a.quantityKey, a]))
    // Contact kinematics describe the approaching pair, not the joined body.
    expect(byKey['contact.escapeSpeed']).toMatchObject({ subject: 'lobe-pair', subjectLabel: 'lobe pair (approach)' })
    expect(byKey['contact.escapeSpeed'].spreadNote).toContain('not centred on the nominal value')
    expect(byKey['contact.speed'].spreadNote).toBe('')
    expect(byKey['contact.speed']).toMatchObject({ value: 0.1 + 0.2, subject: 'lobe-pair', spread: { basis: 'study-spread', min: 0.25, max: 0.35000000000000003, std: 0.02, n: 60, samples: 64, seed: 7, priors: 'density uniform 400–900 kg m⁻³' } })
    expect(byKey['merged.J2']).toMatchObject({ value: STUDY_RESULT.merged.J2, subject: 'merged-body', referenceRadius: STUDY_RESULT.merged.referenceRadius, spread: { basis: 'study-spread', std: 0.01, n: 60 } })
    expect(byKey['merged.spinPeriod'].spread).toBeNull()
    expect(byKey['contact.speed'].provenance).toMatchObject({ source: 'study', study: { id: studyId, input: { overlapDepth: 250, orientationB: [0.5, 0.5, 0.5, 0.5] } }, lobeA: { sha256: lobeDense.sha256, densityKgM3: 1500 }, lobeB: { sha256: lobeOther.sha256 } })
    for (const a of res.json.items) expect((await as.reviewer.post(`/api/attachments/${a.id}/review`, { decision: 'accept' })).status).toBe(200)

    const page = (await as.viewer.get(`/api/objects/${recordId}`)).json
    const json = await as.viewer.get(`/api/objects/${recordId}/export.json`)
    expect(json.status).toBe(200)
    expect(json.json).toMatchObject({ format: 'isthmus-object-record', formatVersion: 1 })
    for (const k of ['object', 'links', 'currentValues', 'attachments', 'comments', 'history', 'cautions']) expect(json.json[k], k).toEqual(page[k])
    // Full precision in the stored row as well as in the answer.
    const stored = (await server.sql().execute({ sql: 'select value from attachments where id = ?', args: [byKey['contact.speed'].id] })).rows[0]!.value
    expect(JSON.parse(String(stored))).toBe(0.1 + 0.2)

    const csv = await as.viewer.get(`/api/objects/${recordId}/export.csv`)
    expect(csv.headers.get('content-type')).toMatch(/text\/csv/)
    const [header, ...rows] = parseCsv(csv.text)
    const col = (name: string) => header!.indexOf(name)
    const speed = rows.find(r => r[col('quantity')] === 'contact.speed')!
    expect(speed[col('value')]).toBe('0.30000000000000004')
    expect(Number(speed[col('value')])).toBe(0.1 + 0.2)
    expect(Number(speed[col('spread_high')])).toBe(0.35000000000000003)
    expect(Number(speed[col('spread_sd')])).toBe(0.02)
    // The spread's own centre and σ, and a note when it is not centred on the value (sampled other inputs).
    expect([Number(speed[col('spread_median')]), Number(speed[col('spread_mean')]), speed[col('spread_centre_note')]]).toEqual([0.3, 0.3, ''])
    const esc = rows.find(r => r[col('quantity')] === 'contact.escapeSpeed')!
    expect([Number(esc[col('spread_median')]), Number(esc[col('spread_mean')]), Number(esc[col('spread_sd')])]).toEqual([0.9, 0.91, 0.1])
    expect(esc[col('spread_centre_note')]).toMatch(/not centred on the nominal value: its centre 0\.9 m s⁻¹ lies 0\.19\d* m s⁻¹ above it/)
    expect(esc[col('subject')]).toBe('lobe-pair')
    // Densities in their own columns (the study's own: 1500 and 1400), and the study inputs to rerun it.
    expect([speed[col('density_a_kg_m3')], speed[col('density_b_kg_m3')], speed[col('density_kg_m3')]]).toEqual(['1500', '1400', ''])
    expect(JSON.parse(speed[col('inputs_json')]!)).toEqual({ source: 'study', studyId, ...STUDY_INPUT, lobeA: lobeDense.id, lobeB: lobeOther.id })
    const massRow = rows.find(r => r[col('quantity')] === 'mass')
    if (massRow) expect(JSON.parse(massRow[col('inputs_json')]!)).toMatchObject({ source: 'lobe', spin: 'not rotating', spinPeriodS: null })
    const j2 = rows.find(r => r[col('quantity')] === 'merged.J2')!
    expect(Number(j2[col('value')])).toBe(STUDY_RESULT.merged.J2)
    expect(Number(j2[col('reference_radius_m')])).toBe(STUDY_RESULT.merged.referenceRadius)
    // One row per scalar and per vector component, for current values only.
    const expectedRows = page.currentValues.reduce((n: number, v: any) => n + (Array.isArray(v.value) ? v.value.length : 1), 0)
    expect(rows.length).toBe(expectedRows)
    for (const v of page.currentValues.filter((v: any) => !Array.isArray(v.value))) {
      const r = rows.find(r => Number(r[col('attachment_id')]) === v.id)!
      expect(Number(r[col('value')]), v.quantityKey).toBe(v.value)
      expect(r[col('unit')]).toBe(v.unit)
    }

    // The list's counts agree with the record.
    const listed = (await as.viewer.get('/api/objects?q=2047%20RZ3')).json.items.find((r: any) => r.id === recordId)
    expect(listed).toMatchObject({ acceptedCount: page.currentValues.length, proposedCount: page.attachments.filter((a: any) => a.state === 'proposed').length })
    expect(listed.proposedCount).toBeGreaterThan(0)
    const byProposed = (await as.viewer.get('/api/objects?sort=proposed&order=desc&limit=200')).json.items.map((r: any) => r.proposedCount)
    expect(byProposed).toEqual([...byProposed].sort((a, b) => b - a))
    expect(byProposed[0]).toBeGreaterThan(0)

    const txt = await as.viewer.get(`/api/objects/${recordId}/export.txt`)
    expect(txt.headers.get('content-type')).toMatch(/text\/plain/)
    expect(txt.text).toContain('2047 RZ3')
    // The spread is written with its own centre (mean, median), not as ± around the nominal value.
    expect(txt.text).toContain('0.30000000000000004 m s⁻¹ (study spread over sampled inputs: median 0.3, mean 0.3, σ 0.02, range [0.25, 0.35000000000000003], n 60)')
    expect(txt.text).toMatch(/Mutual escape speed at contact \(contact\.escapeSpeed, lobe pair \(approach\)\) = 0\.7071067811865476 m s⁻¹ \(study spread over sampled inputs: median 0\.9, mean 0\.91, σ 0\.1[^\n]*\n {4}NOTE: The spread is not centred on the nominal value/)
    expect(txt.text).toContain('lobe A mesh slab-dense.obj')
    expect(txt.text).toContain(lobeDense.sha256)
    expect(txt.text).toMatch(/Cautions:\n- Every value is a model estimate/)
  })

  it('comments on an attachment (reviewers ask, analysts answer, viewers only read) and mails followers who want comment mails', async () => {
    const a = (await as.viewer.get(`/api/objects/${recordId}`)).json.currentValues[0]
    const before = (await as.viewer.get(`/api/attachments/${a.id}/comments`)).json.items.length
    expect((await as.viewer.post(`/api/attachments/${a.id}/comments`, { body: 'A viewer may not write this' })).status).toBe(403)
    expect((await as.reviewer.post(`/api/attachments/${a.id}/comments`, { body: '' })).status).toBe(422)
    const res = await as.reviewer.post(`/api/attachments/${a.id}/comments`, { body: 'Which mesh version is this?' })
    expect(res.status).toBe(201)
    const mail = await latestMailTo(as.admin, 'second.reviewer@example.org')
    expect(mail.subject).toContain('New comment')
    expect(mail.text).toContain('Which mesh version is this?')
    expect((await as.analyst.post(`/api/attachments/${a.id}/comments`, { body: 'The second upload of the mesh.' })).status).toBe(201)
    const thread = (await as.viewer.get(`/api/attachments/${a.id}/comments`)).json.items
    expect(thread.length).toBe(before + 2)
    expect(thread.at(-2)).toMatchObject({ kind: 'comment', body: 'Which mesh version is this?', author: { id: ids.reviewer } })
    expect(thread.at(-1)).toMatchObject({ kind: 'comment', body: 'The second upload of the mesh.', author: { id: ids.analyst } })
    expect((await reviewer2.delete(`/api/objects/${recordId}/follow`)).json).toEqual({ following: false })
  })

  it('API tokens: a viewer token reads and exports (audited) but cannot write; a revoked token gets 401', async () => {
    const created = await as.viewer.post('/api/account/tokens', { label: 'records script' })
    expect(created.status).toBe(201)
    const bot = new Agent(server.url, { authorization: `Bearer ${created.json.token}` })
    expect((await bot.get('/api/objects?limit=1')).status).toBe(200)
    expect((await bot.get(`/api/objects/${recordId}/export.json`)).status).toBe(200)
    expect((await bot.get(`/api/objects/${recordId}/export.csv`)).status).toBe(200)
    expect((await bot.get(`/api/objects/${recordId}/export.txt`)).status).toBe(200)
    expect(await count(`select count(*) from audit_events where action = 'record.exported' and actor_id = ? and subject_id = ?`, [ids.viewer, String(recordId)])).toBe(3)
    // Lobe exports by token are audited the same way; exports in a session are not.
    expect((await bot.get(`/api/lobes/${lobeDense.id}/export.json`)).status).toBe(200)
    expect((await bot.get(`/api/lobes/${lobeDense.id}/export.csv`)).status).toBe(200)
    expect((await as.viewer.get(`/api/lobes/${lobeDense.id}/export.csv`)).status).toBe(200)
    const lobeExports = await server.sql().execute({ sql: `select detail from audit_events where action = 'lobe.exported' and actor_id = ? and subject_id = ? order by id`, args: [ids.viewer, String(lobeDense.id)] })
    expect(lobeExports.rows.map(r => JSON.parse(String(r.detail)))).toEqual([{ format: 'json', token: created.json.id }, { format: 'csv', token: created.json.id }])
    expect((await bot.post('/api/objects', { designation: '2047 TK1', name: 'Token' })).status).toBe(403)
    expect((await bot.patch(`/api/objects/${recordId}`, { notes: 'by token' })).status).toBe(403)
    expect((await bot.post(`/api/objects/${recordId}/attachments`, { lobe: lobeDense.id, quantities: ['mass'] })).status).toBe(403)
    const proposed = await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeDense.id, subject: 'lobe-b', quantities: ['mass'] })
    expect((await bot.post(`/api/attachments/${proposed.json.items[0].id}/review`, { decision: 'accept' })).status).toBe(403)
    // An analyst's token can write.
    const analystToken = (await as.analyst.post('/api/account/tokens', { label: 'pipeline' })).json.token
    const pipeline = new Agent(server.url, { authorization: `Bearer ${analystToken}` })
    expect((await pipeline.post(`/api/objects/${recordId}/attachments`, { lobe: lobeDense.id, subject: 'lobe-b', quantities: ['volume'] })).status).toBe(201)

    expect((await as.viewer.delete(`/api/account/tokens/${created.json.id}`)).status).toBe(200)
    expect((await bot.get('/api/objects')).status).toBe(401)
    expect((await bot.get(`/api/objects/${recordId}/export.json`)).status).toBe(401)
  })
})

describe('object records when mail cannot be sent', () => {
  let server: RunningServer
  let admin: Agent
  beforeAll(async () => {
    // Outgoing mail to a closed port: every send fails.
    server = await startServer({ SMTP_URL: 'smtp://127.0.0.1:9' })
    await server.sql().execute('PRAGMA busy_timeout = 10000')
    admin = new Agent(server.url)
    await admin.signIn('root@example.org', 'root-password-123')
  })
  afterAll(() => server?.dispose())

  it('keeps the attachment and the review, and logs and audits the failed mail', async () => {
    const sql = server.sql()
    const rid = (await admin.post('/api/objects', { designation: '2049 MF1', name: 'Mail failure' })).json.id
    // A reviewer who follows the record (inserted directly: invitations would need mail too).
    const rev = await sql.execute({ sql: `insert into users (email, name, role, password_hash) values ('quiet.reviewer@example.org', 'Quiet Reviewer', 'reviewer', 'x') returning id`, args: [] })
    const reviewerId = Number(rev.rows[0]![0])
    await sql.execute({ sql: 'insert into object_follows (object_id, user_id) values (?, ?)', args: [rid, reviewerId] })
    const lobe = await uploadLobe(admin, writeObj(boxMesh(1, 1, 1)), 'cube.obj', { density: '1000', units: 'km' })
    expect(lobe.status, lobe.text).toBe(201)
    const res = await admin.post(`/api/objects/${rid}/attachments`, { lobe: lobe.json.id, subject: 'whole-body', quantities: ['mass'] })
    expect(res.status, res.text).toBe(201)
    const id = res.json.items[0].id
    const failures = async () => Number((await sql.execute({ sql: `select count(*) from audit_events where action = 'record.mail-failed' and subject_id = ?`, args: [String(rid)] })).rows[0]![0])
    expect(await failures()).toBe(1)
    // The decision mail goes to the proposer: make the reviewer the proposer, then decide as admin.
    await sql.execute({ sql: 'update attachments set proposed_by = ? where id = ?', args: [reviewerId, id] })
    const review = await admin.post(`/api/attachments/${id}/review`, { decision: 'accept' })
    expect(review.status, review.text).toBe(200)
    expect(await failures()).toBe(2)
    const row = (await sql.execute({ sql: 'select state from attachments where id = ?', args: [id] })).rows[0]!
    expect(row.state).toBe('accepted')
    expect(server.log()).toMatch(/record mail to member #\d+ failed/)
  })
})
