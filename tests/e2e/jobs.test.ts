import { request } from 'node:http'
import { readdirSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { icosphere, writePly } from '#shared/geometry'
import { Agent } from './support/http'
import { uploadLobe, waitForField, waitForStudy } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

const G = 6.67430e-11 // CODATA 2018

describe('the embedded job engine: shared jobs, guarded results, fair turns, resuming after a crash', () => {
  let server: RunningServer
  let analyst: Agent
  let admin: Agent
  beforeAll(async () => {
    // No demo data: only this test's jobs use the workers.
    server = await startServer({ ISTHMUS_FIELD_POINTS: '2000', ISTHMUS_WORKERS: '2' })
    admin = new Agent(server.url)
    await admin.signIn('root@example.org', 'root-password-123')
    analyst = admin
  })
  afterAll(() => server?.dispose())

  it('runs identical field jobs once, and a density change never leaves the old density\'s field on the lobe', async () => {
    const R = 500
    const bytes = writePly(icosphere(5, R), 'binary_little_endian')
    const lobes = []
    for (let i = 0; i < 3; i++) lobes.push((await uploadLobe(analyst, bytes, `same-${i}.ply`, { density: '1000', units: 'm' })).json)
    // Same file, units, density, spin and point budget: one job serves all three.
    const jobIds = new Set(lobes.map(l => l.properties.gravityJob.id))
    expect(jobIds.size).toBe(1)
    const [keep, changed] = lobes
    await expect.poll(async () => (await analyst.get(`/api/lobes/${changed.id}`)).json.properties.gravityJob.status, { timeout: 30_000, interval: 50 }).toBe('running')
    const patched = await analyst.request('PATCH', `/api/lobes/${changed.id}`, { density: 2500 })
    expect(patched.status, patched.text).toBe(200)
    expect(patched.json.properties.gravityJob.id).not.toBe(lobes[0].properties.gravityJob.id)
    // While both jobs run, the changed lobe shows no field or the new density's, never the old one.
    const oldDone = waitForField(analyst, keep.id)
    const seen: number[] = []
    for (;;) {
      const l = (await analyst.get(`/api/lobes/${changed.id}`)).json
      if (l.properties.surfaceGravity) seen.push(l.properties.surfaceGravity.mean)
      if (l.properties.gravityJob.status === 'done' && l.properties.surfaceGravity) break
      if (['failed', 'cancelled'].includes(l.properties.gravityJob.status)) throw new Error(`new job ${l.properties.gravityJob.status}`)
      await new Promise(r => setTimeout(r, 50))
    }
    const old = (await oldDone).properties.surfaceGravity.mean
    const fresh = (await waitForField(analyst, changed.id)).properties.surfaceGravity.mean
    // Uniform sphere: g = (4/3)πGρR at the surface (Newton's shell theorem); a 20 480-face
    // icosphere is inscribed in the sphere, so its mean surface gravity is within ~1 % of it.
    expect(Math.abs(old / ((4 / 3) * Math.PI * G * 1000 * R) - 1)).toBeLessThan(0.01)
    // The field is linear in density: the changed lobe's field is the old one × 2.5, up to round-off.
    expect(Math.abs(fresh / (2.5 * old) - 1)).toBeLessThan(1e-12)
    for (const g of seen) expect(Math.abs(g / (2.5 * old) - 1)).toBeLessThan(1e-12)
    // The third lobe followed the first job to its end as well.
    expect((await waitForField(analyst, lobes[2].id)).properties.surfaceGravity.mean).toBe(old)
  })

  it('gives a new study a worker at once behind a big surface field, and lists both jobs for the admin', async () => {
    const a = (await uploadLobe(analyst, writePly(icosphere(3, 400), 'binary_little_endian'), 'a.ply', { density: '1500', units: 'm' })).json
    const b = (await uploadLobe(analyst, writePly(icosphere(3, 250), 'binary_little_endian'), 'b.ply', { density: '1500', units: 'm' })).json
    await waitForField(analyst, a.id)
    await waitForField(analyst, b.id)
    const study = (direction: number[]) => ({ lobeA: a.id, lobeB: b.id, direction, orbit: { kind: 'parabolic' }, overlapDepth: 5, sweepSteps: 0 })
    // Idle time of the study alone.
    let t = Date.now()
    const idle = await waitForStudy(analyst, (await analyst.post('/api/studies', study([1, 0, 0]))).json.id)
    const idleMs = Date.now() - t
    expect(idle.status, idle.error).toBe('done')
    // A big lobe (81 920 faces × 2000 points: hundreds of chunks), then at once the same kind of study.
    const big = (await uploadLobe(analyst, writePly(icosphere(6, 2000), 'binary_little_endian'), 'big.ply', { density: '1000', units: 'm' })).json
    t = Date.now()
    const posted = (await analyst.post('/api/studies', study([0, 1, 0]))).json
    expect(posted.status).toBe('queued')
    let runningAfter = Infinity
    for (;;) {
      const s = (await analyst.get(`/api/studies/${posted.id}`)).json
      if (s.status !== 'queued' && runningAfter === Infinity) runningAfter = Date.now() - t
      if (!['queued', 'running'].includes(s.status)) break
      await new Promise(r => setTimeout(r, 50))
    }
    const busyMs = Date.now() - t
    const bigJob = (await analyst.get(`/api/lobes/${big.id}`)).json.properties.gravityJob
    console.info(`[jobs] study alone ${idleMs} ms; behind a big field: running after ${runningAfter} ms, done after ${busyMs} ms (field ${bigJob.status} ${Math.round(bigJob.progress * 100)} %)`)
    expect(runningAfter).toBeLessThan(2000)
    // Within 2× the idle time (plus the 50 ms polling step of this test).
    expect(busyMs).toBeLessThan(2 * idleMs + 100)
    // The big field is still running: the study did not wait for it.
    expect(bigJob.status).toBe('running')
    const list = await admin.get('/api/jobs?active=1')
    expect(list.status).toBe(200)
    const row = list.json.items.find((j: { subject: { id: number } | null, kind: string }) => j.kind === 'surface-field' && j.subject?.id === big.id)
    expect(row).toMatchObject({ status: 'running', owner: { name: expect.any(String) }, queuePosition: null })
    expect(row.ageSeconds).toBeGreaterThan(0)
    expect(list.json.engine).toMatchObject({ kind: 'embedded', threads: 2 })
    // The admin cancels it; the lobe shows no field from it.
    expect((await admin.post(`/api/jobs/${row.id}/cancel`)).status).toBe(200)
    expect((await admin.post(`/api/jobs/${row.id}/cancel`)).status).toBe(409)
    const after = (await analyst.get(`/api/lobes/${big.id}`)).json
    expect(after.properties.gravityJob.status).toBe('cancelled')
    expect(after.properties.surfaceGravity).toBeNull()
  })

  it('after kill -9 during an upload, a study and a surface field: sweeps temporary and unreferenced files, and finishes the work by itself', async () => {
    const a = (await uploadLobe(analyst, writePly(icosphere(3, 300), 'binary_little_endian'), 'c1.ply', { density: '1200', units: 'm' })).json
    const b = (await uploadLobe(analyst, writePly(icosphere(3, 200), 'binary_little_endian'), 'c2.ply', { density: '1200', units: 'm' })).json
    await waitForField(analyst, b.id)
    const field = (await uploadLobe(analyst, writePly(icosphere(5, 900), 'binary_little_endian'), 'field.ply', { density: '900', units: 'm' })).json
    const spread = { seed: 3, samples: 16, densityA: { kind: 'uniform', min: 900, max: 1500 }, densityB: { kind: 'fixed', value: 1200 }, coneHalfAngleDeg: 10, scale: { kind: 'fixed', value: 1 } }
    const st = (await analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [0, 0, 1], orbit: { kind: 'parabolic' }, overlapDepth: 2, sweepSteps: 0, spread })).json
    await expect.poll(async () => (await analyst.get(`/api/studies/${st.id}`)).json.status, { timeout: 30_000, interval: 50 }).toBe('running')
    await expect.poll(async () => (await analyst.get(`/api/lobes/${field.id}`)).json.properties.gravityJob.status, { timeout: 30_000, interval: 50 }).toBe('running')
    // An upload in flight: half of a multipart body, then the server dies.
    const tmpDir = join(server.env.UPLOADS_DIR!, 'tmp')
    const boundary = 'xxjobsboundaryxx'
    const req = request(`${server.url}/api/lobes`, { method: 'POST', headers: { 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': String(40 * 1024 * 1024), 'cookie': analyst.cookieHeader() } })
    req.on('error', () => undefined)
    req.write(`--${boundary}\r\ncontent-disposition: form-data; name="units"\r\n\r\nm\r\n--${boundary}\r\ncontent-disposition: form-data; name="file"; filename="cut.ply"\r\ncontent-type: application/octet-stream\r\n\r\n`)
    req.write(Buffer.alloc(4 * 1024 * 1024, 32))
    await expect.poll(() => readdirSync(tmpDir).length, { timeout: 10_000, interval: 50 }).toBeGreaterThan(0)
    await server.crash()
    req.destroy()
    expect(readdirSync(tmpDir).length).toBeGreaterThan(0)
    await server.restart()
    await analyst.signIn('root@example.org', 'root-password-123')
    // Swept at start: nothing in tmp.
    expect(readdirSync(tmpDir)).toEqual([])
    // Both jobs resume by themselves and finish.
    const done = await waitForStudy(analyst, st.id)
    expect(done.status, done.error).toBe('done')
    expect(done.result.spread.sampleValues).toHaveLength(16)
    const lobe = await waitForField(analyst, field.id, 120_000)
    // Uniform sphere: g = (4/3)πGρR (shell theorem), within the inscribed mesh's ~1 %.
    expect(Math.abs(lobe.properties.surfaceGravity.mean / ((4 / 3) * Math.PI * G * 900 * 900) - 1)).toBeLessThan(0.01)
    const sql = server.sql()
    const attempts = (await sql.execute({ sql: 'select attempts from jobs where id in (?, ?)', args: [lobe.properties.gravityJob.id, (await sql.execute({ sql: 'select job_id from studies where id = ?', args: [st.id] })).rows[0]![0]] })).rows.map(r => Number(r[0]))
    expect(attempts).toEqual([2, 2])
    // No derived file without a row that refers to it.
    const lobesRows = (await sql.execute('select sha256, units, surface from lobes')).rows
    const referenced = new Set<string>()
    for (const r of lobesRows) {
      referenced.add(`${r.sha256}-${r.units}.analysis.bin`).add(`${r.sha256}-${r.units}.display.bin`)
      const f = r.surface ? JSON.parse(String(r.surface)).fieldsFile : null
      if (f) referenced.add(f)
    }
    for (const r of (await sql.execute('select cache_key from studies')).rows) referenced.add(`union-${r.cache_key}.analysis.bin`).add(`union-${r.cache_key}.display.bin`)
    for (const r of (await sql.execute(`select result from jobs where result is not null and kind = 'surface-field'`)).rows) referenced.add(JSON.parse(String(r.result)).fieldsFile)
    const orphans = readdirSync(join(server.env.UPLOADS_DIR!, 'derived')).filter(f => !referenced.has(f))
    expect(orphans).toEqual([])
    expect((await sql.execute('PRAGMA integrity_check')).rows[0]![0]).toBe('ok')
  })
})
