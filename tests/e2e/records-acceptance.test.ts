import { createHash } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { perturbedEllipsoid, writeObj, writePly } from '#shared/geometry'
import { significantText } from '#shared/utils/number-text'
import { openBrowser } from './support/browser'
import { Agent } from './support/http'
import { uploadLobe, waitForStudy } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

/**
 * Issue acceptance, one flow through the public routes and the real record page: two uploaded lobes,
 * a real contact study, values attached to a record, review by mail on the local SMTP server,
 * current value with provenance, supersession by a second study, JSON export = page.
 */
describe('records acceptance: upload → study → attach → mail → review → current value → supersede → export', () => {
  let server: RunningServer
  let browser: Awaited<ReturnType<typeof openBrowser>>
  const as = {} as Record<'admin' | 'analyst' | 'reviewer' | 'viewer', Agent>
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '200' })
    for (const who of ['admin', 'analyst', 'reviewer', 'viewer'] as const) {
      as[who] = new Agent(server.url)
      await as[who].signIn(`${who}@example.org`, 'isthmus-demo')
    }
    browser = await openBrowser()
  })
  afterAll(async () => {
    await browser?.close()
    await server?.dispose()
  })

  /** Mail to `to` in the server's mail drop (stored by its embedded SMTP server) whose subject matches. */
  async function mailTo(to: string, subject: RegExp) {
    const deadline = Date.now() + 10_000
    for (;;) {
      const items = (await as.admin.get('/api/mail-drop?limit=100')).json.items as { envelopeTo: string[], subject: string, text: string }[]
      const hit = items.find(m => m.envelopeTo.includes(to) && subject.test(m.subject))
      if (hit) return hit
      if (Date.now() > deadline) throw new Error(`no mail to ${to} matching ${subject}; have: ${items.map(m => `${m.envelopeTo} ${m.subject}`).join(' | ')}`)
      await new Promise(r => setTimeout(r, 100))
    }
  }

  async function runStudy(body: Record<string, unknown>) {
    const res = await as.analyst.post('/api/studies', body)
    expect(res.status, res.text).toBe(202)
    const study = await waitForStudy(as.analyst, res.json.id)
    expect(study.status, study.error).toBe('done')
    return study
  }

  async function recordPage(id: number) {
    await browser.context.clearCookies()
    const page = await browser.context.newPage()
    await page.goto(`${server.url}/sign-in`)
    await page.getByLabel('E-mail').fill('viewer@example.org')
    await page.getByLabel('Password').fill('isthmus-demo')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.waitForURL(u => !u.pathname.startsWith('/sign-in'))
    await page.goto(`${server.url}/objects/${id}`)
    await expect.poll(() => page.getByTestId('record-designation').innerText()).toContain('2061 AC4')
    return page
  }

  /** The rows of the record page's current-values table, as shown. */
  async function shownCurrent(page: Awaited<ReturnType<typeof recordPage>>) {
    return page.getByTestId('current-values').locator('tbody tr').evaluateAll(trs => trs.map(tr => ({
      key: tr.getAttribute('data-key'),
      id: Number(tr.getAttribute('data-attachment')),
      exact: tr.querySelector('[data-testid="value"]')?.getAttribute('title'),
      text: (tr as HTMLElement).innerText,
    })))
  }

  it('two lobes, a real study, a mailed proposal, accept + reject, provenance on the page, supersession by a second study, export = page', async () => {
    const version = (await as.viewer.get('/api/health')).json.version
    expect(typeof version).toBe('string')

    // 1. Two procedurally generated lobes (perturbed ellipsoids, invented), uploaded as OBJ and binary PLY in km.
    const bytesA = writeObj(perturbedEllipsoid(1.4, 1.0, 0.9, 3, 31, 0.08))
    const bytesB = writePly(perturbedEllipsoid(0.9, 0.7, 0.6, 3, 32, 0.08), 'binary_little_endian')
    const upA = await uploadLobe(as.analyst, bytesA, 'lobe-north.obj', { density: '850', units: 'km', name: 'North lobe' })
    const upB = await uploadLobe(as.analyst, bytesB, 'lobe-south.ply', { density: '1150', units: 'km', name: 'South lobe' })
    expect([upA.status, upB.status], `${upA.text} ${upB.text}`).toEqual([201, 201])
    const [lobeA, lobeB] = [upA.json, upB.json]
    // The stored hash is the SHA-256 of the bytes sent (FIPS 180-4, via node:crypto).
    expect(lobeA.sha256).toBe(createHash('sha256').update(bytesA).digest('hex'))
    expect(lobeB.sha256).toBe(createHash('sha256').update(bytesB).digest('hex'))

    // 2. A real study: parabolic head-on approach along x.
    const input1 = { title: 'Parabolic approach', lobeA: lobeA.id, lobeB: lobeB.id, direction: [1, 0, 0], orbit: { kind: 'parabolic' }, sweepSteps: 0 }
    const study1 = await runStudy(input1)
    const speed1: number = study1.result.contact.speed
    const j2: number = study1.result.merged.J2
    expect(speed1).toBeGreaterThan(0)
    expect(Number.isFinite(j2)).toBe(true)

    // 3. A record; reviewers get a mail for each proposal whether or not they follow it.
    const created = await as.analyst.post('/api/objects', { designation: '2061 AC4', name: 'Acceptance pair', population: 'kuiper-belt' })
    expect(created.status, created.text).toBe(201)
    const recordId: number = created.json.id
    expect((await as.reviewer.post(`/api/objects/${recordId}/follow`)).json).toEqual({ following: true })

    // 4. The analyst attaches the contact speed and the merged J2 (keys from shared/types/quantities.ts).
    // Each is proposed with the subject it describes: the approaching pair, the merged body.
    const attachedPair = await as.analyst.post(`/api/objects/${recordId}/attachments`, { study: study1.id, subject: 'lobe-pair', quantities: ['contact.speed'] })
    expect(attachedPair.status, attachedPair.text).toBe(201)
    const attachedMerged = await as.analyst.post(`/api/objects/${recordId}/attachments`, { study: study1.id, subject: 'merged-body', quantities: ['merged.J2'] })
    expect(attachedMerged.status, attachedMerged.text).toBe(201)
    const byKey = Object.fromEntries([...attachedPair.json.items, ...attachedMerged.json.items].map((a: any) => [a.quantityKey, a]))
    const speedAtt = byKey['contact.speed']
    const j2Att = byKey['merged.J2']
    expect(speedAtt).toMatchObject({ value: speed1, unit: 'm s⁻¹', subject: 'lobe-pair', state: 'proposed' })
    expect(j2Att).toMatchObject({ value: j2, unit: '1', subject: 'merged-body', referenceRadius: study1.result.merged.referenceRadius, state: 'proposed' })

    // 5. The reviewer's notice, received by the embedded SMTP server and read from the mail drop.
    // One mail per proposed value, the subject first.
    const notice = await mailTo('reviewer@example.org', /Review 2061 AC4 — lobe pair/)
    expect(notice.subject).toBe(`[Isthmus] Review 2061 AC4 — lobe pair (approach): Contact speed (#${speedAtt.id})`)
    expect(notice.text).toContain(`#${speedAtt.id} [LOBE PAIR (APPROACH)] Contact speed`)
    expect(notice.text).toContain(`${significantText(speed1, 6)} m s⁻¹`) // 6 digits in mails; full precision on the page
    expect(notice.text).toContain(`/objects/${recordId}`)
    const notice2 = await mailTo('reviewer@example.org', /Review 2061 AC4 — merged body/)
    expect(notice2.text).toContain(`#${j2Att.id} [MERGED BODY] Merged J2`)

    // 6. Accept one, reject the other with a comment; the analyst hears of both.
    const ok = await as.reviewer.post(`/api/attachments/${speedAtt.id}/review`, { decision: 'accept', comment: 'Head-on parabolic case checked.' })
    expect(ok.status, ok.text).toBe(200)
    const no = await as.reviewer.post(`/api/attachments/${j2Att.id}/review`, { decision: 'reject', comment: 'Needs the overlap-corrected merged shape.' })
    expect(no.status, no.text).toBe(200)
    expect((await mailTo('analyst@example.org', /2061 AC4 was rejected/)).text).toContain('Needs the overlap-corrected merged shape.')
    expect((await mailTo('analyst@example.org', /2061 AC4 was accepted/)).text).toContain('Head-on parabolic case checked.')

    // 7. The record: the accepted value is current, with its frozen provenance.
    let rec = (await as.viewer.get(`/api/objects/${recordId}`)).json
    expect(rec.currentValues.map((v: any) => v.id)).toEqual([speedAtt.id])
    const current = rec.currentValues[0]
    expect(current.value).toBe(speed1)
    expect(current.provenance).toMatchObject({
      source: 'study',
      study: { id: study1.id, input: { ...input1, densityA: 850, densityB: 1150 } },
      lobeA: { id: lobeA.id, sha256: lobeA.sha256, sourceFileName: 'lobe-north.obj', densityKgM3: 850 },
      lobeB: { id: lobeB.id, sha256: lobeB.sha256, sourceFileName: 'lobe-south.ply', densityKgM3: 1150 },
      algorithmVersion: study1.algorithmVersion,
      softwareVersion: version,
    })
    expect(rec.attachments.find((a: any) => a.id === j2Att.id)).toMatchObject({ state: 'rejected', reviewComment: 'Needs the overlap-corrected merged shape.' })

    // ... and the record page shows it, exact value on hover, source, provenance in the thread.
    let page = await recordPage(recordId)
    let shown = await shownCurrent(page)
    expect(shown.map(({ key, id, exact }) => ({ key, id, exact }))).toEqual([{ key: 'contact.speed', id: speedAtt.id, exact: String(speed1) }])
    expect(shown[0]!.text).toContain(`study #${study1.id}`)
    expect(shown[0]!.text).toContain('lobe-north.obj + lobe-south.ply')
    expect(current.reviewedBy.name).toMatch(/\w/)
    expect(shown[0]!.text).toContain(current.reviewedBy.name)
    await page.locator(`[data-attachment-card="${speedAtt.id}"] button`).first().click()
    const thread = page.locator(`[data-attachment-card="${speedAtt.id}"]`)
    await expect.poll(() => thread.innerText()).toContain(`software ${version}`)
    await thread.locator('summary').click()
    const provenanceText = await thread.locator('pre').innerText()
    expect(JSON.parse(provenanceText)).toEqual(current.provenance)
    await page.close()

    // 8. A second study with another approach (hyperbolic, v∞ = 0.5 m s⁻¹) → a second contact speed.
    const vInf = 0.5
    const study2 = await runStudy({ ...input1, title: 'Hyperbolic approach', orbit: { kind: 'hyperbolic', vInfinity: vInf } })
    const speed2: number = study2.result.contact.speed
    // Same lobes, direction and contact distance d: vis-viva gives v² = v∞² + 2GM/d (docs/contact-and-kinematics.md),
    // so v₂² − v₁² = v∞² exactly up to rounding.
    expect(Math.abs(speed2 ** 2 - speed1 ** 2 - vInf ** 2) / speed2 ** 2).toBeLessThan(1e-9)
    const second = await as.analyst.post(`/api/objects/${recordId}/attachments`, { study: study2.id, subject: 'lobe-pair', quantities: ['contact.speed'] })
    expect(second.status, second.text).toBe(201)
    const speed2Att = second.json.items[0]
    const ok2 = await as.reviewer.post(`/api/attachments/${speed2Att.id}/review`, { decision: 'accept', comment: 'Hyperbolic case supersedes.' })
    expect(ok2.status, ok2.text).toBe(200)

    rec = (await as.viewer.get(`/api/objects/${recordId}`)).json
    expect(rec.currentValues.map((v: any) => [v.id, v.value])).toEqual([[speed2Att.id, speed2]])
    expect(rec.currentValues[0].provenance.study).toMatchObject({ id: study2.id, input: { orbit: { kind: 'hyperbolic', vInfinity: vInf } } })
    expect(rec.attachments.find((a: any) => a.id === speedAtt.id)).toMatchObject({ state: 'superseded', supersededBy: speed2Att.id, value: speed1 })
    const kinds = (id: number) => rec.history.filter((h: any) => h.attachmentId === id).map((h: any) => h.kind)
    expect(kinds(speedAtt.id)).toEqual(['superseded', 'accepted', 'proposed'])
    expect(kinds(speed2Att.id)).toEqual(['accepted', 'proposed'])
    expect(kinds(j2Att.id)).toEqual(['rejected', 'proposed'])

    // 9. The JSON export carries exactly what the record page shows.
    const exported = await as.viewer.get(`/api/objects/${recordId}/export.json`)
    expect(exported.status).toBe(200)
    for (const k of ['object', 'currentValues', 'attachments', 'comments', 'history']) expect(exported.json[k], k).toEqual(rec[k])
    page = await recordPage(recordId)
    shown = await shownCurrent(page)
    expect(shown.map(({ key, id, exact }) => ({ key, id, exact }))).toEqual(
      exported.json.currentValues.map((v: any) => ({ key: v.quantityKey, id: v.id, exact: String(v.value) })))
    expect(Number(shown[0]!.exact)).toBe(speed2)
    // Both speeds stay in the page's history and cards.
    const history = await page.getByTestId('history').innerText()
    expect(history).toContain(`#${speedAtt.id}`)
    expect(history).toContain(`#${speed2Att.id}`)
    expect(history).toMatch(/superseded/)
    const card = (id: number) => page.locator(`[data-attachment-card="${id}"]`).innerText()
    expect(await card(speedAtt.id)).toMatch(/superseded/)
    expect(await card(speed2Att.id)).toMatch(/accepted/)
    expect(await card(j2Att.id)).toMatch(/rejected/)
    await page.close()
  })
})
