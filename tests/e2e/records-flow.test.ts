import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { icosphere, writePly } from '#shared/geometry'
import { Agent } from './support/http'
import { uploadLobe, waitForStudy } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

const G = 6.67430e-11 // m³ kg⁻¹ s⁻², CODATA 2018

describe('upload → study → attach → review → export, through the public routes only', () => {
  let server: RunningServer
  const as = {} as Record<'analyst' | 'reviewer' | 'viewer', Agent>
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '200' })
    for (const who of ['analyst', 'reviewer', 'viewer'] as const) {
      as[who] = new Agent(server.url)
      await as[who].signIn(`${who}@example.org`, 'isthmus-demo')
    }
  })
  afterAll(() => server?.dispose())

  it('freezes the study\'s contact speed and the lobe masses on a record, exactly as computed', async () => {
    const a = (await uploadLobe(as.analyst, writePly(icosphere(3, 2), 'binary_little_endian'), 'big.ply', { density: '1000', units: 'm' })).json
    const b = (await uploadLobe(as.analyst, writePly(icosphere(3, 1), 'binary_little_endian'), 'small.ply', { density: '1000', units: 'm' })).json
    const started = await as.analyst.post('/api/studies', { lobeA: a.id, lobeB: b.id, direction: [1, 0, 0], orbit: { kind: 'parabolic' }, sweepSteps: 0 })
    expect(started.status, started.text).toBe(202)
    const study = await waitForStudy(as.viewer, started.json.id)
    expect(study.status, study.error).toBe('done')

    const record = (await as.analyst.post('/api/objects', { designation: '2055 FL2', name: 'Flow pair' })).json.id
    const preview = (await as.analyst.get(`/api/attachments/preview?study=${study.id}`)).json
    const speedPreview = preview.items.find((i: any) => i.key === 'contact.speed')
    expect(speedPreview).toMatchObject({ available: true, value: study.result.contact.speed })
    const fromStudy = await as.analyst.post(`/api/objects/${record}/attachments`, { study: study.id, subject: 'lobe-pair', quantities: ['contact.speed', 'contact.escapeSpeed'] })
    expect(fromStudy.status, fromStudy.text).toBe(201)
    const fromA = await as.analyst.post(`/api/objects/${record}/attachments`, { lobe: a.id, subject: 'lobe-a', quantities: ['mass', 'equivalentRadius'] })
    const fromB = await as.analyst.post(`/api/objects/${record}/attachments`, { lobe: b.id, subject: 'lobe-b', quantities: ['mass', 'equivalentRadius'] })
    expect([fromA.status, fromB.status]).toEqual([201, 201])
    for (const x of [...fromStudy.json.items, ...fromA.json.items, ...fromB.json.items]) {
      expect((await as.reviewer.post(`/api/attachments/${x.id}/review`, { decision: 'accept', comment: 'flow' })).status).toBe(200)
    }

    const exported = (await as.viewer.get(`/api/objects/${record}/export.json`)).json
    const v = (key: string, subject: string) => exported.currentValues.find((c: any) => c.quantityKey === key && c.subject === subject)
    expect(v('contact.speed', 'lobe-pair').value).toBe(study.result.contact.speed)
    expect(v('mass', 'lobe-a').value).toBe(a.properties.mass)
    expect(v('contact.speed', 'lobe-pair').provenance).toMatchObject({ study: { id: study.id }, lobeA: { sha256: a.sha256, sourceFileName: 'big.ply', densityKgM3: 1000 }, lobeB: { sha256: b.sha256 } })
    // Head-on parabolic approach: contact speed = √(2G(mA + mB)/d) at touching distance d (vis-viva,
    // docs/contact-and-kinematics.md); with the attached masses and equivalent radii, d ≈ rA + rB for the near-spheres.
    const d = v('equivalentRadius', 'lobe-a').value + v('equivalentRadius', 'lobe-b').value
    const visViva = Math.sqrt(2 * G * (v('mass', 'lobe-a').value + v('mass', 'lobe-b').value) / d)
    expect(v('contact.speed', 'lobe-pair').value / visViva).toBeCloseTo(1, 1)
    const csv = (await as.viewer.get(`/api/objects/${record}/export.csv`)).text
    expect(csv).toContain(`,contact.speed,`)
    expect(csv).toContain(`,${String(study.result.contact.speed)},m s⁻¹,`)
  })
})
