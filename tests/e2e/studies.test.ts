import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { icosphere, writePly } from '#shared/geometry'
import { Agent } from './support/http'
import { uploadLobe, waitForStudy } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

const G = 6.67430e-11 // CODATA 2018

describe('contact studies through the API', () => {
  let server: RunningServer
  const as = {} as Record<'analyst' | 'viewer' | 'admin' | 'reviewer', Agent>
  let a: any
  let b: any
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '200' })
    for (const who of ['analyst', 'viewer', 'admin', 'reviewer'] as const) {
      as[who] = new Agent(server.url)
      await as[who].signIn(`${who}@example.org`, 'isthmus-demo')
    }
    a = (await uploadLobe(as.analyst, writePly(icosphere(3, 2), 'binary_little_endian'), 'big.ply', { density: '1000', units: 'm' })).json
    b = (await uploadLobe(as.analyst, writePly(icosphere(3, 1), 'binary_little_endian'), 'small.ply', { density: '1000', units: 'm' })).json
  })
  afterAll(() => server?.dispose())

  it('runs a head-on parabolic approach of two spheres: contact speed equals the mutual escape speed (vis-viva, docs/contact-and-kinematics.md)', async () => {
    const res = await as.analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [1, 0, 0], orbit: { kind: 'parabolic' }, sweepSteps: 0 })
    expect(res.status, res.text).toBe(202)
    const done = await waitForStudy(as.viewer, res.json.id)
    expect(done.status, done.error).toBe('done')
    const c = done.result.contact
    for (const k of ['separation', 'point', 'normalA', 'poseB', 'speed', 'escapeSpeed', 'sphereEquivalentEscapeSpeed', 'speedRatio', 'radialSpeed', 'tangentialSpeed', 'normalSpeed', 'impactAngleFromNormalDeg', 'impactAngleFromTangentDeg', 'orbitalAngularMomentum', 'massRatio', 'speedFullShape', 'escapeSpeedFullShape']) expect(c).toHaveProperty(k)
    for (const k of ['massModel', 'volume', 'mass', 'centroid', 'principalMoments', 'principalAxes', 'J2', 'C22', 'referenceRadius', 'spinPeriod', 'spinAxis', 'relaxedSpinPeriod', 'tumbleAngleDeg', 'breakupSpinPeriod', 'separation', 'separationSpinPeriod', 'neckStress']) expect(done.result.merged).toHaveProperty(k)
    // The icospheres are inscribed: d lies between the sums of their inner and outer radii.
    expect(c.separation).toBeLessThanOrEqual(3 + 1e-6)
    expect(c.separation).toBeGreaterThan(2.9)
    const M = a.properties.mass + b.properties.mass
    expect(c.escapeSpeed).toBeCloseTo(Math.sqrt(2 * G * M / c.separation), 12)
    expect(c.speed / c.escapeSpeed).toBeCloseTo(1, 9)
    expect(c.impactAngleFromNormalDeg).toBeLessThan(1)
    expect(done.result.neck.area).toBe(0)
    expect(done.result.merged.massModel).toBe('conserve-mass')
    // √(3π/(Gρ)) at the merged bulk density (docs/contact-and-kinematics.md).
    expect(done.result.merged.breakupSpinPeriod).toBeCloseTo(Math.sqrt(3 * Math.PI / (G * done.result.merged.density)), 6)
    expect(done.result.unionStored).toBe(true)
    // Head-on from rest with lobes synchronous with a non-rotating orbit: no angular momentum, so the
    // merged body does not spin and its spin period and tumble angle are undefined (null), not huge.
    expect(done.result.merged.spinPeriod).toBeNull()
    expect(done.result.merged.tumbleAngleDeg).toBeNull()
    const mesh = await as.viewer.get(`/api/studies/${res.json.id}/mesh`)
    expect(mesh.status, mesh.text.slice(0, 300)).toBe(200)
    const obj = await as.viewer.get(`/api/studies/${res.json.id}/merged.obj`)
    expect(obj.status).toBe(200)
    expect(obj.text).toMatch(/^#|^v /m)

    // An identical request reuses the cached result at once.
    const again = await as.analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [2, 0, 0], orbit: { kind: 'parabolic' }, sweepSteps: 0 })
    expect(again.json.status).toBe('done')
    expect((await as.viewer.get(`/api/studies/${again.json.id}`)).json.result.contact.speed).toBe(c.speed)
    const list = await as.viewer.get(`/api/studies?pairA=${a.id}&pairB=${b.id}`)
    expect(list.json.items[0].id).toBe(again.json.id)
  })

  it('runs a spread in chunks on the workers: with fixed priors and no cone every sample equals the nominal study; densities scale speeds as √ρ', async () => {
    const base = { lobeA: a.id, lobeB: b.id, direction: [0, 1, 1], orbit: { kind: 'parabolic' }, sweepSteps: 0 }
    const fixed = (v: number) => ({ kind: 'fixed', value: v })
    const nominal = await waitForStudy(as.viewer, (await as.analyst.post('/api/studies', base)).json.id)
    const spread = await waitForStudy(as.viewer, (await as.analyst.post('/api/studies', { ...base, spread: { seed: 3, samples: 12, densityA: fixed(4000), densityB: fixed(4000), coneHalfAngleDeg: 0, scale: fixed(1), neck: false } })).json.id)
    expect(spread.status, spread.error).toBe('done')
    expect(spread.result.spread.samples).toBe(12)
    expect(spread.result.spread.sampleValues).toHaveLength(12)
    expect(spread.result.spread.sampleValues.map((s: { index: number }) => s.index)).toEqual([...Array(12).keys()])
    // Common density ×4 → speeds ×2 (v ∝ √ρ at fixed geometry; docs/contact-and-kinematics.md vis-viva).
    expect(spread.result.spread.speed.min / nominal.result.contact.speed).toBeCloseTo(2, 9)
    expect(spread.result.spread.speed.max / nominal.result.contact.speed).toBeCloseTo(2, 9)
  })

  it('reports "no contact" when the pericentre lies outside the contact separation', async () => {
    const res = await as.analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [0, 1, 0], orbit: { kind: 'bound', semiMajorAxis: 50, eccentricity: 0.1 } })
    const done = await waitForStudy(as.viewer, res.json.id)
    expect(done.status).toBe('done')
    expect(done.result.contact.contact).toBe(false)
    expect(done.result.contact.pericentre).toBeCloseTo(45, 9)
    expect(done.result.merged).toBeNull()
  })

  it('rejects invalid input with 422 naming each bad field', async () => {
    const res = await as.analyst.post('/api/studies', { lobeA: a.id, lobeB: 999999, direction: [0, 0, 0], orbitNormal: [1, 0, 0], orbit: { kind: 'bound', semiMajorAxis: -1, eccentricity: 2 } })
    expect(res.status).toBe(422)
    const paths = res.json.data.issues.map((i: { path: string }) => i.path)
    expect(paths).toEqual(expect.arrayContaining(['direction', 'orbit.semiMajorAxis', 'orbit.eccentricity']))
    const perp = await as.analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [1, 0, 0], orbitNormal: [1, 1, 0], orbit: { kind: 'parabolic' } })
    expect(perp.status).toBe(422)
    expect(perp.json.data.issues[0].path).toBe('orbitNormal')
    const missing = await as.analyst.post('/api/studies', { lobeA: a.id, lobeB: 999999, direction: [1, 0, 0], orbit: { kind: 'parabolic' } })
    expect(missing.status).toBe(422)
    expect(missing.json.data.issues[0].path).toBe('lobeB')
    // A lobe against itself is refused, naming lobeB, and nothing is queued.
    const self = await as.analyst.post('/api/studies', { lobeA: a.id, lobeB: a.id, direction: [1, 0, 0], orbit: { kind: 'parabolic' } })
    expect(self.status).toBe(422)
    expect(self.json.data.issues).toEqual([{ path: 'lobeB', message: expect.stringMatching(/different lobe from lobe A/) }])
    expect((await as.viewer.get(`/api/studies?pairA=${a.id}&pairB=${a.id}`)).json.items).toEqual([])
    expect((await as.viewer.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [1, 0, 0], orbit: { kind: 'parabolic' } })).status).toBe(403)
  })

  it('cancels a running study, and resumes a study interrupted by a restart', async () => {
    const spread = { seed: 7, samples: 400, densityA: { kind: 'uniform', min: 500, max: 1500 }, densityB: { kind: 'uniform', min: 500, max: 1500 }, coneHalfAngleDeg: 20, scale: { kind: 'fixed', value: 1 } }
    const res = await as.analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [0, 0, 1], orbit: { kind: 'parabolic' }, overlapDepth: 0.1, spread })
    // Progress reaches the row while the study runs: the stage moves on from waiting and the fraction grows.
    await expect.poll(async () => {
      const s = (await as.viewer.get(`/api/studies/${res.json.id}`)).json
      return s.status === 'running' && s.stage === 'spread' && s.progress > 0.6 && s.progress < 1
    }, { timeout: 20_000, interval: 100 }).toBe(true)
    expect((await as.reviewer.post(`/api/studies/${res.json.id}/cancel`)).status).toBe(403)
    const cancel = await as.analyst.post(`/api/studies/${res.json.id}/cancel`)
    expect(cancel.status).toBe(200)
    const after = await waitForStudy(as.viewer, res.json.id)
    expect(after.status).toBe('cancelled')
    expect((await as.analyst.post(`/api/studies/${res.json.id}/cancel`)).status).toBe(409)

    const long = await as.analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [0, -1, 0], orbit: { kind: 'parabolic' }, overlapDepth: 0.1, spread: { ...spread, seed: 8, samples: 48 } })
    await expect.poll(async () => (await as.viewer.get(`/api/studies/${long.json.id}`)).json.status, { timeout: 20_000, interval: 100 }).toBe('running')
    await server.restart()
    for (const who of Object.values(as)) expect((await who.get('/api/session')).json.user).toBeTruthy()
    // The job resumes by itself from its inputs after the restart, and says it was started twice.
    const resumed = await waitForStudy(as.viewer, long.json.id)
    expect(resumed.status).toBe('done')
    expect(resumed.result.spread.sampleValues).toHaveLength(48)
    const job = (await server.sql().execute({ sql: 'select attempts, status from jobs where id = (select job_id from studies where id = ?)', args: [long.json.id] })).rows[0]!
    expect([Number(job.attempts), job.status]).toEqual([2, 'done'])
  })

  it('keeps lobes that a study cites from being deleted', async () => {
    expect((await as.analyst.delete(`/api/lobes/${a.id}`)).status).toBe(409)
  })
})
