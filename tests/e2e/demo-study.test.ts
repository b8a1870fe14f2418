import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Agent } from './support/http'
import { startServer, type RunningServer } from './support/server'

/** The demo's contact study: seeded once, runs to the end on the workers, linked to the demo record. */
describe('demo contact study', () => {
  let server: RunningServer
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_DEMO_STUDY: '1', ISTHMUS_FIELD_POINTS: '200' })
  })
  afterAll(() => server?.dispose())

  async function demoStudies(viewer: Agent) {
    const list = (await viewer.get('/api/studies')).json
    return list.items.filter((s: { title: string | null }) => s.title?.startsWith('Demo:'))
  }

  it('finishes with a touching bound approach, a neck, a screen and a spread; a restart neither repeats nor fails it', async () => {
    const viewer = new Agent(server.url)
    await viewer.signIn('viewer@example.org', 'isthmus-demo')
    const [seeded] = await demoStudies(viewer)
    expect(seeded).toBeTruthy()
    const deadline = Date.now() + 90_000
    let study = (await viewer.get(`/api/studies/${seeded.id}`)).json
    while (study.status === 'queued' || study.status === 'running') {
      if (Date.now() > deadline) throw new Error(`demo study still ${study.status} at ${study.stage}`)
      await new Promise(r => setTimeout(r, 500))
      study = (await viewer.get(`/api/studies/${seeded.id}`)).json
    }
    expect(study.status, study.error).toBe('done')
    const r = study.result
    // Bound orbit a = 30 km, e = 0.5: contact exists iff q = 15 km ≤ d ≤ Q = 45 km (two-body
    // geometry, docs/contact-and-kinematics.md), and vis-viva at d gives v² = GM(2/d − 1/a) < escape speed².
    expect(r.contact.separation).toBeGreaterThan(15_000)
    expect(r.contact.separation).toBeLessThan(45_000)
    expect(r.contact.speed).toBeLessThan(r.contact.escapeSpeed)
    expect(r.neck.overlapDepth).toBe(600)
    expect(r.neck.area).toBeGreaterThan(0)
    expect(r.screen.hillRadius).toBeGreaterThan(0)
    // its pericentre q = a(1 − e) = 15 km is already inside d: the screen says so, and the page
    // does not call the path closed (definition of pericentre; common practice, no source)
    expect(r.screen.currentPericentre).toBeCloseTo(15_000, 6)
    expect(r.screen.currentPericentreReachesContact).toBe(true)
    const page = (await viewer.get(`/studies/${seeded.id}`)).text
    expect(page).toContain('The present orbit already reaches contact')
    expect(page).not.toContain('this path to contact is closed')
    expect(r.spread.samples).toBe(32)

    const record = (await viewer.get('/api/objects?q=2041%20KD9')).json.items[0]
    const links = (await viewer.get(`/api/objects/${record.id}`)).json.links
    expect(links.studies.map((s: { id: number }) => s.id)).toContain(seeded.id)

    // the seeds are in the audit trail like any other change
    const admin = new Agent(server.url)
    await admin.signIn('admin@example.org', 'isthmus-demo')
    const actions = (await admin.get('/api/audit?limit=200')).json.items.map((e: { action: string, subjectId: string }) => `${e.action} ${e.subjectId}`)
    expect(actions).toContain(`study.demo-seeded ${seeded.id}`)
    expect(actions.filter((a: string) => a.startsWith('lobe.demo-seeded'))).toHaveLength(4)

    await server.restart()
    const after = await demoStudies(viewer)
    expect(after.map((s: { id: number, status: string }) => [s.id, s.status])).toEqual([[seeded.id, 'done']])
  })

  it('saves the merged body as a lobe that keeps the inherited spin and says where it came from', async () => {
    const analyst = new Agent(server.url)
    await analyst.signIn('analyst@example.org', 'isthmus-demo')
    const [seeded] = await demoStudies(analyst)
    const merged = (await analyst.get(`/api/studies/${seeded.id}`)).json.result.merged
    expect(merged.spinPeriod).toBeGreaterThan(0)
    const saved = await analyst.post(`/api/studies/${seeded.id}/merged-lobe`, {})
    expect(saved.status, saved.text).toBe(201)
    const lobe = (await analyst.get(`/api/lobes/${saved.json.id}`)).json
    expect(lobe.spinPeriodHours).toBeCloseTo(merged.spinPeriod / 3600, 12)
    expect(lobe.spinAxis).toEqual(merged.spinAxis)
    expect(lobe.properties.density).toBe(merged.density)
    const page = (await analyst.get(`/lobes/${saved.json.id}`)).text
    expect(page).toContain(`The merged body of <a href="/studies/${seeded.id}"`)
    expect(page).toContain(`the bulk density of study #${seeded.id}&#39;s merged body, not a measurement`)
    expect(page).not.toContain('your choice, not a measurement')
    expect(page).not.toContain('nothing was repaired')
  })
})
