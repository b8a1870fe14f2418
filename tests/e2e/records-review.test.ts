import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { SMTPServer } from 'smtp-server'
import { simpleParser } from 'mailparser'
import { Cite } from '@citation-js/core'
import '@citation-js/plugin-bibtex'
import '@citation-js/plugin-csl'
import { boxMesh, writeObj } from '../../shared/geometry'
import { Agent, linkIn } from './support/http'
import { uploadLobe } from './support/lobes'
import { freePort, startServer, type RunningServer } from './support/server'

interface Mail { to: string[], subject: string, text: string }

/**
 * Issue acceptance 1–3 through the public API and a real SMTP server on loopback started here (the
 * app sends to it through SMTP_URL): mail for each proposal / digest / none, bulk review with one
 * comment and four eyes per value, audit rows, explicit subjects (422 without one), and the BibTeX
 * and CSL-JSON exports read back with citation-js.
 */
describe('records: proposal mail, bulk review, explicit subjects, citable exports', () => {
  const mails: Mail[] = []
  let smtp: SMTPServer
  let server: RunningServer
  const as = {} as Record<'admin' | 'analyst' | 'reviewer' | 'viewer' | 'digest' | 'quiet', Agent>
  const ids = {} as Record<keyof typeof as, number>
  let recordId: number
  let lobeA: any
  let lobeB: any
  /** The analyst's eight proposed values (ids), in the order proposed. */
  let eight: number[] = []

  beforeAll(async () => {
    const port = await freePort()
    smtp = new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS'],
      onData(stream, session, callback) {
        simpleParser(stream).then((m) => {
          mails.push({ to: session.envelope.rcptTo.map(r => r.address), subject: m.subject ?? '', text: m.text ?? '' })
          callback()
        }, callback)
      },
    })
    await new Promise<void>(resolve => smtp.listen(port, '127.0.0.1', resolve))
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '200', SMTP_URL: `smtp://127.0.0.1:${port}` })
    await server.sql().execute('PRAGMA busy_timeout = 10000')
    for (const who of ['admin', 'analyst', 'reviewer', 'viewer'] as const) {
      as[who] = new Agent(server.url)
      ids[who] = (await as[who].signIn(`${who}@example.org`, 'isthmus-demo')).id
    }
    // Two more reviewers, invited by mail and joined: one wants a daily digest, one no proposal mail.
    for (const [who, name] of [['digest', 'Dana Digest'], ['quiet', 'Quinn Quiet']] as const) {
      const email = `${who}.reviewer@example.org`
      expect((await as.admin.post('/api/invitations', { email, role: 'reviewer' })).status).toBe(201)
      const invitation = await waitFor(() => mails.find(m => m.to.includes(email)))
      as[who] = new Agent(server.url)
      expect((await as[who].post(new URL(linkIn(invitation.text)).pathname.replace('/join/', '/api/join/'), { name, password: `${who}-reviewer-pw-1` })).status).toBe(200)
      ids[who] = (await as[who].signIn(email, `${who}-reviewer-pw-1`)).id
    }
    expect((await as.digest.patch('/api/account/record-mail', { proposals: 'digest' })).json).toEqual({ proposals: 'digest', decisions: true, comments: true })
    expect((await as.quiet.patch('/api/account/record-mail', { proposals: 'none' })).json.proposals).toBe('none')
    expect((await as.quiet.patch('/api/account/record-mail', { proposals: 'weekly' })).status).toBe(422)

    // Two invented lobes (boxes in km; V = a·b·c, closed form) and a new record that nobody follows but its creator.
    lobeA = (await uploadLobe(as.analyst, writeObj(boxMesh(2, 1, 1)), 'lobe-a.obj', { density: '600', units: 'km' })).json
    lobeB = (await uploadLobe(as.analyst, writeObj(boxMesh(1, 1, 0.5)), 'lobe-b.obj', { density: '550', units: 'km' })).json
    recordId = (await as.analyst.post('/api/objects', { designation: '2063 QR5', name: 'Review pair' })).json.id
  })
  afterAll(async () => {
    await server?.dispose()
    await new Promise<void>(resolve => (smtp ? smtp.close(() => resolve()) : resolve()))
  })

  async function waitFor<T>(probe: () => T | undefined | false, timeoutMs = 10_000): Promise<T> {
    const deadline = Date.now() + timeoutMs
    for (;;) {
      const v = probe()
      if (v) return v
      if (Date.now() > deadline) throw new Error(`timed out; mails so far:\n${mails.map(m => `${m.to} | ${m.subject}`).join('\n')}`)
      await new Promise(r => setTimeout(r, 100))
    }
  }
  const mailsTo = (email: string, subject: RegExp) => mails.filter(m => m.to.includes(email) && subject.test(m.subject))
  async function count(sql: string, args: (string | number)[] = []) {
    return Number((await server.sql().execute({ sql, args })).rows[0]![0])
  }

  it('acceptance 2: refuses a proposal without a subject (422 naming the field) and stores nothing', async () => {
    const before = await count('select count(*) from attachments')
    for (const body of [{ lobe: lobeA.id, quantities: ['mass'] }, { study: 1, quantities: ['contact.speed'] }]) {
      const res = await as.analyst.post(`/api/objects/${recordId}/attachments`, body)
      expect(res.status, res.text).toBe(422)
      expect(res.json.data.issues).toEqual([{ path: 'subject', message: expect.stringContaining('lobe A, lobe B, whole body, lobe pair (approach) or merged body') }])
    }
    // a single lobe cannot stand for the merged body
    const merged = await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeA.id, subject: 'merged-body', quantities: ['mass'] })
    expect(merged.status).toBe(422)
    expect(merged.json.data.issues[0].path).toBe('subject')
    expect(await count('select count(*) from attachments')).toBe(before)
    expect(mails.filter(m => /Review 2063 QR5/.test(m.subject))).toEqual([])
  })

  it('acceptance 1a: eight proposals mail every "each proposal" reviewer once per value; the digest member gets one digest; nobody else', async () => {
    const fromA = await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeA.id, subject: 'lobe-a', quantities: ['volume', 'mass', 'J2', 'principalMoments'] })
    const fromB = await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeB.id, subject: 'lobe-b', quantities: ['volume', 'mass', 'J2'] })
    // lobe A's surface area filed as the whole body of a record with two lobes: allowed, with a warning for the reviewer
    const odd = await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeA.id, subject: 'whole-body', quantities: ['surfaceArea'] })
    for (const r of [fromA, fromB, odd]) expect(r.status, r.text).toBe(201)
    eight = [...fromA.json.items, ...fromB.json.items, ...odd.json.items].map((a: any) => a.id)
    expect(eight).toHaveLength(8)
    expect(odd.json.items[0].subjectWarning).toMatch(/single lobe's value .* filed as the whole body, but this record has two lobes/)
    expect(fromA.json.items[0].subjectWarning).toBeNull()
    // Box 2 × 1 × 1 km: V = 2 km³ = 2e9 m³ (closed form); M = ρV.
    expect(fromA.json.items[0].value / 2e9).toBeCloseTo(1, 9)

    // Reviewers and admins who want each proposal: the demo reviewer, the demo admin and the first admin.
    const each = ['reviewer@example.org', 'admin@example.org', 'root@example.org']
    const proposalMail = /^\[Isthmus\] Review 2063 QR5 — /
    await waitFor(() => each.every(e => mailsTo(e, proposalMail).length >= 8))
    await new Promise(r => setTimeout(r, 500))
    for (const e of each) {
      const got = mailsTo(e, proposalMail)
      expect(got, e).toHaveLength(8)
      // one mail per value, each naming its subject in the subject line
      expect(got.map(m => Number(m.subject.match(/\(#(\d+)\)$/)![1])).sort((x, y) => x - y)).toEqual([...eight].sort((x, y) => x - y))
    }
    const oddMail = mailsTo('reviewer@example.org', new RegExp(`\\(#${eight[7]}\\)$`))[0]!
    expect(oddMail.subject).toBe(`[Isthmus] Review 2063 QR5 — whole body: Surface area (#${eight[7]})`)
    expect(oddMail.text).toContain('Check the subject: A single lobe\'s value')
    expect(mailsTo('reviewer@example.org', /lobe A: Mass/)[0]!.text).toContain('It describes: lobe A.')
    // the proposer, the viewer, the digest and the quiet reviewer get no per-value mail
    for (const e of ['analyst@example.org', 'viewer@example.org', 'digest.reviewer@example.org', 'quiet.reviewer@example.org']) expect(mailsTo(e, proposalMail), e).toEqual([])

    // The digest, triggered as the schedule would run it: one mail listing all eight.
    const run = await as.admin.post('/api/reviews/digest')
    expect(run.status, run.text).toBe(200)
    expect(run.json.sent).toEqual([{ memberId: ids.digest, values: expect.any(Number) }])
    const digest = await waitFor(() => mailsTo('digest.reviewer@example.org', /Digest/)[0])
    for (const id of eight) expect(digest.text).toContain(`#${id} [`)
    expect(digest.text).toContain('2063 QR5')
    expect(digest.text).toContain('[WHOLE BODY] Surface area')
    // Nothing new since: the next run mails nobody.
    expect((await as.admin.post('/api/reviews/digest')).json.sent).toEqual([])
    await new Promise(r => setTimeout(r, 300))
    expect(mailsTo('digest.reviewer@example.org', /Digest/)).toHaveLength(1)
    expect(mails.filter(m => m.to.includes('quiet.reviewer@example.org') && /Review|Digest/.test(m.subject))).toEqual([])
    expect((await as.reviewer.post('/api/reviews/digest')).status).toBe(403)
  })

  it('acceptance 1b: the queue lists what a reviewer may decide, with filters; the subject warning shows', async () => {
    const q = await as.reviewer.get(`/api/reviews?record=${recordId}`)
    expect(q.status, q.text).toBe(200)
    expect(q.json.items.map((i: any) => i.id).sort((x: number, y: number) => x - y)).toEqual([...eight].sort((x, y) => x - y))
    expect(q.json.items.find((i: any) => i.id === eight[7]).subjectWarning).toMatch(/two lobes/)
    expect(q.json.items.every((i: any) => i.designation === '2063 QR5' && i.proposedBy.id === ids.analyst)).toBe(true)
    expect((await as.reviewer.get(`/api/reviews?record=${recordId}&quantity=mass`)).json.items.map((i: any) => i.subject).sort()).toEqual(['lobe-a', 'lobe-b'])
    expect((await as.reviewer.get(`/api/reviews?record=${recordId}&proposer=${ids.analyst}&age=day`)).json.total).toBe(8)
    expect((await as.reviewer.get(`/api/reviews?record=${recordId}&age=older-than-week`)).json.total).toBe(0)
    expect((await as.reviewer.get(`/api/reviews?proposer=${ids.reviewer}`)).json.total).toBe(0)
    expect(q.json.filters.records.find((r: any) => r.id === recordId)).toEqual({ id: recordId, designation: '2063 QR5', count: 8 })
    expect((await as.reviewer.get('/api/reviews?age=someday')).status).toBe(422)
    expect((await as.analyst.get('/api/reviews')).status).toBe(403)
  })

  it('acceptance 1c: one request accepts 6 and rejects 2 with one comment; audit rows for each; the proposer gets the decisions', async () => {
    const accept = eight.slice(0, 6)
    const reject = eight.slice(6)
    const comment = 'Checked against the mesh report; lobe B J2 and the whole-body area need another look.'
    // rejecting needs the comment
    expect((await as.reviewer.post('/api/reviews', { decisions: reject.map(attachmentId => ({ attachmentId, decision: 'reject' })) })).json.data.issues[0].path).toBe('comment')
    const res = await as.reviewer.post('/api/reviews', {
      decisions: [...accept.map(attachmentId => ({ attachmentId, decision: 'accept' })), ...reject.map(attachmentId => ({ attachmentId, decision: 'reject' }))],
      comment,
    })
    expect(res.status, res.text).toBe(200)
    expect(res.json).toMatchObject({ accepted: 6, rejected: 2, refused: 0 })
    expect(res.json.results.map((r: any) => [r.attachmentId, r.outcome])).toEqual([...accept.map(i => [i, 'accepted']), ...reject.map(i => [i, 'rejected'])])
    const states = (await server.sql().execute({ sql: `select id, state, reviewed_by, review_comment from attachments where object_id = ? order by id`, args: [recordId] })).rows
    expect(states.map(r => [Number(r.id), r.state])).toEqual(eight.map(i => [i, accept.includes(i) ? 'accepted' : 'rejected']))
    expect(states.every(r => Number(r.reviewed_by) === ids.reviewer && r.review_comment === comment)).toBe(true)
    for (const id of eight) {
      const action = accept.includes(id) ? 'record.value-accepted' : 'record.value-rejected'
      const rows = (await server.sql().execute({ sql: `select actor_id, detail from audit_events where action = ? and subject_type = 'attachment' and subject_id = ?`, args: [action, String(id)] })).rows
      expect(rows, `${action} #${id}`).toHaveLength(1)
      expect(Number(rows[0]!.actor_id)).toBe(ids.reviewer)
      expect(JSON.parse(String(rows[0]!.detail))).toMatchObject({ object: recordId, comment })
    }
    // One mail to the proposer with all eight decisions and the comment.
    const decided = await waitFor(() => mailsTo('analyst@example.org', /Your values: 6 accepted, 2 rejected/)[0])
    for (const id of eight) expect(decided.text).toContain(`#${id} [`)
    expect(decided.text).toContain(comment)
    const page = (await as.viewer.get(`/api/objects/${recordId}`)).json
    expect(page.currentValues).toHaveLength(6)
    expect(page.history.at(-1)).toMatchObject({ kind: 'created', attachmentId: null, by: { id: ids.analyst } })
  })

  it('acceptance 1d: in a bulk request the reviewer\'s own values are refused one by one with the reason, the rest go through', async () => {
    const own = await as.admin.post(`/api/objects/${recordId}/attachments`, { lobe: lobeB.id, subject: 'lobe-b', quantities: ['surfaceArea', 'equivalentRadius'] })
    expect(own.status, own.text).toBe(201)
    const [area, radius] = own.json.items.map((a: any) => a.id)
    const other = await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeB.id, subject: 'lobe-b', quantities: ['maxRadius'] })
    const otherId = other.json.items[0].id
    const res = await as.admin.post('/api/reviews', {
      decisions: [{ attachmentId: area, decision: 'accept' }, { attachmentId: otherId, decision: 'accept' }, { attachmentId: radius, decision: 'reject' }, { attachmentId: eight[0], decision: 'accept' }, { attachmentId: 99_999_999, decision: 'accept' }],
      comment: 'Admin pass.',
    })
    expect(res.status, res.text).toBe(200)
    expect(res.json).toMatchObject({ accepted: 1, rejected: 0, refused: 4 })
    expect(res.json.results).toEqual([
      { attachmentId: area, outcome: 'refused', code: 'own-proposal', reason: expect.stringMatching(/You proposed this value: another reviewer must decide it/) },
      { attachmentId: otherId, outcome: 'accepted', superseded: [] },
      { attachmentId: radius, outcome: 'refused', code: 'own-proposal', reason: expect.stringMatching(/four-eyes/) },
      { attachmentId: eight[0], outcome: 'refused', code: 'already-decided', reason: expect.stringMatching(/already decided \(accepted\)/) },
      { attachmentId: 99_999_999, outcome: 'refused', code: 'not-found', reason: 'No attachment #99999999' },
    ])
    expect((await server.sql().execute({ sql: 'select state from attachments where id in (?, ?)', args: [area, radius] })).rows.map(r => r.state)).toEqual(['proposed', 'proposed'])
    // the admin's own values are not in the admin's queue; another reviewer decides them
    const queue = (await as.admin.get(`/api/reviews?record=${recordId}`)).json
    expect(queue.items.map((i: any) => i.id)).not.toContain(area)
    expect(queue.ownAwaiting).toBe(2)
    expect((await as.reviewer.post('/api/reviews', { decisions: [{ attachmentId: area, decision: 'accept' }, { attachmentId: radius, decision: 'accept' }] })).json.accepted).toBe(2)
    expect((await as.reviewer.post('/api/reviews', { decisions: [{ attachmentId: area, decision: 'accept' }, { attachmentId: area, decision: 'reject' }], comment: 'x' })).status).toBe(422)
  })

  it('acceptance 3: BibTeX and CSL-JSON exports parse with citation-js and carry value, quantity, unit, subject and provenance', async () => {
    // A finished study row with an invented result (export check, not physics): a contact speed with a spread σ.
    const input = { lobeA: lobeA.id, lobeB: lobeB.id, direction: [1, 0, 0], orientationB: [1, 0, 0, 0], orbit: { kind: 'bound', semiMajorAxis: 30_000, eccentricity: 0.5 }, overlapDepth: 120 }
    const result = { contact: { speed: 0.4821337712 }, spread: { seed: 5, samples: 32, speed: { median: 0.4811, mean: 0.4815, std: 0.02136, min: 0.43, max: 0.53, n: 32 } } }
    const ins = await server.sql().execute({
      sql: `insert into studies (owner_id, lobe_a_id, lobe_b_id, title, input, cache_key, status, progress, result, algorithm_version, finished_at) values (?, ?, ?, 'cite check', ?, 'cite1', 'done', 1, ?, 'contact-study test-1', ?) returning id`,
      args: [ids.analyst, lobeA.id, lobeB.id, JSON.stringify(input), JSON.stringify(result), Date.now()],
    })
    const speed = await as.analyst.post(`/api/objects/${recordId}/attachments`, { study: Number(ins.rows[0]![0]), subject: 'lobe-pair', quantities: ['contact.speed'] })
    expect(speed.status, speed.text).toBe(201)
    expect((await as.reviewer.post('/api/reviews', { decisions: [{ attachmentId: speed.json.items[0].id, decision: 'accept' }] })).json.accepted).toBe(1)
    const version = (await as.viewer.get('/api/health')).json.version
    const rec = (await as.viewer.get(`/api/objects/${recordId}`)).json

    const bib = await as.viewer.get(`/api/objects/${recordId}/export.bib`)
    expect(bib.status).toBe(200)
    expect(bib.headers.get('content-type')).toMatch(/x-bibtex/)
    const entries = new Cite(bib.text).data as Record<string, any>[]
    expect(entries).toHaveLength(rec.currentValues.length)
    const csl = await as.viewer.get(`/api/objects/${recordId}/export.csl.json`)
    const items = new Cite(csl.json).data as Record<string, any>[]
    expect(items).toHaveLength(rec.currentValues.length)
    for (const v of rec.currentValues) {
      const key = `isthmus_2063qr5_${v.id}`
      const b = entries.find(e => e.id === key)!
      const c = items.find(e => e.id === key)!
      expect(b, key).toBeDefined()
      for (const e of [b, c]) {
        expect(e.title).toContain('2063 QR5')
        expect(e.title).toContain(v.subjectLabel)
        expect(e.title).toContain(v.label)
        expect(e.note).toContain(`subject: ${v.subjectLabel} [${v.subject}]`)
        expect(e.note).toContain(`[${v.quantityKey}]`)
        expect(e.note).toContain(`software: Isthmus ${version}`)
        expect(e.note).toContain(`algorithm: ${v.provenance.algorithmVersion}`)
        expect(e.note).toContain(`accepted: ${v.reviewedAt}`)
        const accepted = new Date(v.reviewedAt)
        expect(e.issued['date-parts'][0]).toEqual([accepted.getUTCFullYear(), accepted.getUTCMonth() + 1, accepted.getUTCDate()])
        const shas = v.source.type === 'lobe' ? [v.provenance.lobe.sha256] : [lobeA.sha256, lobeB.sha256]
        for (const sha of shas) expect(e.note).toContain(sha)
      }
      expect(c.custom.isthmus).toMatchObject({ attachmentId: v.id, quantity: v.quantityKey, subject: v.subject, value: v.value, unit: v.unit, softwareVersion: version })
    }
    const lobeValue = items.find(e => e.custom.isthmus.quantity === 'mass' && e.custom.isthmus.subject === 'lobe-a')!
    expect(lobeValue.note).toContain('density: 600 kg m-3')
    expect(lobeValue.note).toContain('approach: none (single-lobe value)')
    expect(lobeValue.custom.isthmus.value).toBe(lobeA.properties.mass) // full float64 precision
    const pair = items.find(e => e.custom.isthmus.quantity === 'contact.speed')!
    // σ = 0.02136 → 0.021 (two significant figures), the value rounded at the same place: 0.482 (GUM §7.2.6)
    expect(pair.title).toContain('lobe pair (approach): Contact speed = 0.482 ± 0.021 m s-1')
    expect(pair.custom.isthmus).toMatchObject({ significantFigures: 3, uncertainty: 0.02136, value: 0.4821337712, densityAKgM3: 600, densityBKgM3: 550 })
    expect(pair.note).toContain('approach: study #')
    expect(pair.note).toContain('bound orbit, a = 30000 m, e = 0.5')
    expect(pair.note).toContain('density: lobe A 600 kg m-3, lobe B 550 kg m-3')
  })
})
