import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { boxMesh, writeObj } from '#shared/geometry'
import { openBrowser } from './support/browser'
import { Agent } from './support/http'
import { uploadLobe } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

describe('in a real browser: create a record, attach from a lobe, review, read the record page', () => {
  let server: RunningServer
  let browser: Awaited<ReturnType<typeof openBrowser>>
  const as = {} as Record<'analyst' | 'reviewer', Agent>
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '200' })
    browser = await openBrowser()
    for (const who of ['analyst', 'reviewer'] as const) {
      as[who] = new Agent(server.url)
      await as[who].signIn(`${who}@example.org`, 'isthmus-demo')
    }
  })
  afterAll(async () => {
    await browser?.close()
    await server?.dispose()
  })

  async function signIn(email: string, next: string) {
    await browser.context.clearCookies()
    const page = await browser.context.newPage()
    await page.goto(`${server.url}${next}`)
    await page.waitForURL(/\/sign-in/)
    await page.getByLabel('E-mail').fill(email)
    await page.getByLabel('Password').fill('isthmus-demo')
    await page.getByRole('button', { name: 'Sign in' }).click()
    // (the sign-in page's own address carries `next`, so wait for leaving it, not for `next` to appear)
    await page.waitForURL(u => !u.pathname.startsWith('/sign-in'))
    return page
  }

  it('validates the form in the page, creates the record, and shows the same values as the JSON export', async () => {
    const page = await signIn('analyst@example.org', '/objects/new')
    await page.getByLabel('Designation').fill('2052 BW7')
    await page.getByLabel('Name used by the team').fill('Browser pair')
    await page.getByLabel('Population').selectOption('near-earth')
    await page.getByLabel(/Heliocentric orbit/).check()
    await page.getByLabel('Semi-major axis a (au)').fill('1.7')
    await page.getByLabel('Eccentricity e').fill('1.3')
    await page.getByLabel('Inclination i (deg)').fill('12')
    await page.getByRole('button', { name: 'Create record' }).click()
    // The shared zod schema refuses e ≥ 1 before anything is sent.
    await expect.poll(() => page.getByTestId('record-form').innerText()).toContain('Eccentricity must be below 1')
    await page.getByLabel('Eccentricity e').fill('0.31')
    await page.getByRole('button', { name: 'Create record' }).click()
    await page.waitForURL(/\/objects\/\d+$/)
    const id = Number(new URL(page.url()).pathname.split('/').pop())
    await expect.poll(() => page.getByTestId('record-designation').innerText()).toContain('2052 BW7')

    // Values: an uploaded lobe, attached through the API, one accepted by the reviewer.
    const lobe = (await uploadLobe(as.analyst, writeObj(boxMesh(1.2, 0.9, 0.7)), 'brick.obj', { density: '2100', units: 'km' })).json
    const attached = await as.analyst.post(`/api/objects/${id}/attachments`, { lobe: lobe.id, subject: 'whole-body', quantities: ['mass', 'J2', 'principalMoments'] })
    expect(attached.status, attached.text).toBe(201)
    for (const a of attached.json.items.slice(0, 2)) expect((await as.reviewer.post(`/api/attachments/${a.id}/review`, { decision: 'accept', comment: 'checked' })).status).toBe(200)

    await page.reload()
    const rows = page.getByTestId('current-values').locator('tbody tr')
    await expect.poll(() => rows.count()).toBe(2)
    const exported = (await as.analyst.get(`/api/objects/${id}/export.json`)).json
    const shown = await rows.evaluateAll(trs => trs.map(tr => ({
      key: tr.getAttribute('data-key'),
      id: Number(tr.getAttribute('data-attachment')),
      exact: tr.querySelector('[data-testid="value"]')?.getAttribute('title'),
    })))
    expect(shown).toEqual(exported.currentValues.map((v: any) => ({ key: v.quantityKey, id: v.id, exact: String(v.value) })))
    await expect.poll(() => page.locator('main').innerText()).toContain('Awaiting review (1)')
    await expect.poll(() => page.getByTestId('history').innerText()).toMatch(/accepted[\s\S]*by Noor Haddad/)
    await page.screenshot({ path: 'test-results/record-page.png', fullPage: true }).catch(() => undefined)
    await page.close()
  })

  it('lets a reviewer accept from the record page and a viewer see the list sorted and filtered', async () => {
    const list = (await as.analyst.get('/api/objects?q=2052%20BW7')).json.items[0]
    const page = await signIn('reviewer@example.org', `/objects/${list.id}`)
    await expect.poll(() => page.locator('main').innerText()).toContain('Awaiting review (1)')
    await page.getByRole('button', { name: 'Accept', exact: true }).click()
    await expect.poll(() => page.getByTestId('current-values').locator('tbody tr').count()).toBe(3)
    await page.getByRole('button', { name: 'Follow', exact: true }).click()
    await expect.poll(() => page.getByTestId('follow-button').innerText()).toBe('Unfollow')

    await page.goto(`${server.url}/objects`)
    await page.getByLabel('Search designation, name or tag').fill('BW7')
    await expect.poll(() => page.getByTestId('records-table').locator('tbody tr').count()).toBe(1)
    await expect.poll(() => page.getByTestId('records-table').innerText()).toContain('2052 BW7')
    await page.getByLabel('Search designation, name or tag').fill('')
    await page.getByRole('button', { name: /Designation/ }).click()
    await expect.poll(() => new URL(page.url()).searchParams.get('order')).toBe('desc')
    // The URL changes at once; the rows follow when the sorted page has arrived.
    const desc = (await as.analyst.get('/api/objects?sort=designation&order=desc&limit=1')).json.items[0].designation
    await expect.poll(() => page.getByTestId('records-table').locator('tbody tr td').first().innerText()).toBe(desc)
    await page.close()
  })

  it('counts comments in words, and the attach dialog proposes once on a double click, then clears and says what it did', async () => {
    const rec = (await as.analyst.get('/api/objects?q=2052%20BW7')).json.items[0]
    const page = await signIn('analyst@example.org', `/objects/${rec.id}`)
    const data = (await as.analyst.get(`/api/objects/${rec.id}`)).json
    const decided = data.attachments.find((a: any) => (data.comments[a.id] ?? []).length === 1)
    const card = page.locator(`[data-attachment-card="${decided.id}"]`)
    await expect.poll(() => card.innerText()).toMatch(/\b1 comment\b/)
    expect(await card.innerText()).not.toContain('1 comments')

    const lobe = (await uploadLobe(as.analyst, writeObj(boxMesh(0.8, 0.6, 0.5)), 'pebble.obj', { density: '1800', units: 'km' })).json
    await page.goto(`${server.url}/lobes/${lobe.id}`)
    await page.getByTestId('attach-open').click()
    const dialog = page.getByRole('dialog')
    await expect.poll(() => dialog.locator('select[name="record"] option').allInnerTexts()).toContain('2052 BW7 — Browser pair')
    await dialog.locator('select[name="record"]').selectOption({ label: '2052 BW7 — Browser pair' })
    // No subject yet: nothing can be picked or proposed.
    expect(await dialog.getByLabel('Surface area').isDisabled()).toBe(true)
    await dialog.locator('select[name="subject"]').selectOption('whole-body')
    await dialog.getByLabel('Surface area').check()
    const before = (await as.analyst.get(`/api/objects/${rec.id}`)).json.attachments.length
    await dialog.getByRole('button', { name: /Propose 1 value/ }).dblclick()
    await expect.poll(() => dialog.getByTestId('attach-done').innerText()).toMatch(/Proposed 1 value for 2052 BW7[\s\S]*Surface area\s+whole body/i)
    // a second lobe filed as the whole body of a record that already has one: the reviewer is warned
    expect(await dialog.getByTestId('attach-done').getByTestId('subject-warning').innerText()).toMatch(/filed as the whole body, but this record has two lobes/)
    expect(await dialog.getByLabel('Surface area').isChecked()).toBe(false)
    expect(await dialog.getByRole('button', { name: /Propose/ }).isDisabled()).toBe(true)
    const after = (await as.analyst.get(`/api/objects/${rec.id}`)).json.attachments
    expect(after.length).toBe(before + 1)
    expect(after.filter((a: any) => a.quantityKey === 'surfaceArea' && a.source.id === lobe.id).length).toBe(1)

    // The analyst's overview lists the record with the proposal's state.
    await page.goto(`${server.url}/`)
    await expect.poll(() => page.getByTestId('my-proposals').locator(`tr[data-record="${rec.id}"]`).innerText()).toMatch(/2052 BW7/)
    await page.close()
  })

  it('shows a spread with its own centre and a note when it is off the value, and periods in hours with the seconds on hover', async () => {
    const rec = (await as.analyst.get('/api/objects?q=2052%20BW7')).json.items[0]
    const lobes = (await as.analyst.get('/api/lobes?limit=2')).json.items
    // A finished study row inserted directly (invented numbers, not physics): the escape-speed spread
    // was drawn over inputs the nominal run did not use, so it is centred well above the value.
    const result = {
      contact: { speed: 3.2, escapeSpeed: 3.32688 },
      merged: { spinPeriod: 42882.7 },
      spread: { seed: 3, samples: 40, contacts: 40, priors: 'densities uniform 300–1200 kg m⁻³', escapeSpeed: { min: 3.07, median: 4.07259, max: 5.22, mean: 4.073, std: 0.517743, n: 40 }, speed: null, spinPeriod: null, neckRadius: null, mergedJ2: null },
    }
    const ins = await server.sql().execute({
      sql: `insert into studies (owner_id, lobe_a_id, lobe_b_id, title, input, cache_key, status, progress, result, algorithm_version, finished_at)
            values ((select id from users where email = 'analyst@example.org'), ?, ?, 'spread check', '{}', 'kb1', 'done', 1, ?, 'test', ?) returning id`,
      args: [lobes[0].id, lobes[1]?.id ?? lobes[0].id, JSON.stringify(result), Date.now()],
    })
    const studyId = Number(ins.rows[0]![0])
    const attachedEsc = await as.analyst.post(`/api/objects/${rec.id}/attachments`, { study: studyId, subject: 'lobe-pair', quantities: ['contact.escapeSpeed'] })
    const attachedSpin = await as.analyst.post(`/api/objects/${rec.id}/attachments`, { study: studyId, subject: 'merged-body', quantities: ['merged.spinPeriod'] })
    expect([attachedEsc.status, attachedSpin.status], attachedEsc.text + attachedSpin.text).toEqual([201, 201])
    const page = await signIn('analyst@example.org', `/objects/${rec.id}`)
    const [esc, spin] = [attachedEsc.json.items[0], attachedSpin.json.items[0]].map((a: any) => page.locator(`[data-proposed="${a.id}"]`))
    await expect.poll(() => esc!.innerText()).toMatch(/lobe pair \(approach\)/i)
    expect(await esc!.innerText()).toContain('Mutual escape speed at contact = 3.32688 m s⁻¹ (study spread over sampled inputs: median 4.07259, mean 4.073, σ 0.517743, range [3.07, 5.22], n 40)')
    expect(await esc!.getByTestId('spread-note').innerText()).toMatch(/not centred on the nominal value: its centre 4\.07259 m s⁻¹ lies 0\.74571 m s⁻¹ above it, 1\.44σ/)
    // 42882.7 s = 11.9119 h (÷ 3600); the exact stored seconds stay in the title.
    expect(await spin!.getByTestId('value-text').innerText()).toBe('11.9119 h')
    expect(await spin!.getByTestId('value-text').getAttribute('title')).toBe('42882.7 s')
    await page.close()
  })

  it('gives reviewers an "awaiting your review" list on the overview, linking to each record', async () => {
    const rec = (await as.analyst.get('/api/objects?q=2052%20BW7')).json.items[0]
    const page = await signIn('reviewer@example.org', '/')
    const queue = page.getByTestId('review-queue')
    const row = queue.locator(`tr[data-record="${rec.id}"]`)
    const waiting = (await as.reviewer.get(`/api/objects/${rec.id}`)).json.attachments.filter((a: any) => a.state === 'proposed').length
    await expect.poll(() => row.innerText()).toContain(`${waiting} value${waiting === 1 ? '' : 's'}`)
    await row.getByRole('link', { name: '2052 BW7' }).click()
    await page.waitForURL(new RegExp(`/objects/${rec.id}$`))
    await expect.poll(() => page.locator('main').innerText()).toContain(`Awaiting review (${waiting})`)
    await page.close()
  })
})
