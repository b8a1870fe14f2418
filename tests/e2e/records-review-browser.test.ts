import { mkdirSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { boxMesh, writeObj } from '../../shared/geometry'
import { openBrowser } from './support/browser'
import { Agent } from './support/http'
import { uploadLobe } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

/**
 * Issue acceptance 4 in Debian chromium: attaching from a lobe page needs a subject (none is
 * preselected; the suggestion names this lobe); the review queue lists, filters and bulk-decides;
 * the record page shows the decisions and a history that starts with the record's creation.
 */
describe('in a real browser: explicit subject, review queue, decisions and history on the record page', () => {
  let server: RunningServer
  let browser: Awaited<ReturnType<typeof openBrowser>>
  const as = {} as Record<'analyst' | 'reviewer', Agent>
  let recordId: number
  let lobeA: any
  let lobeB: any
  const shots = 'test-results/records-review'

  beforeAll(async () => {
    mkdirSync(shots, { recursive: true })
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '200' })
    browser = await openBrowser()
    for (const who of ['analyst', 'reviewer'] as const) {
      as[who] = new Agent(server.url)
      await as[who].signIn(`${who}@example.org`, 'isthmus-demo')
    }
    lobeA = (await uploadLobe(as.analyst, writeObj(boxMesh(2, 1, 1)), 'queue-large.obj', { density: '600', units: 'km', name: 'Queue pair — large lobe' })).json
    lobeB = (await uploadLobe(as.analyst, writeObj(boxMesh(1, 1, 0.5)), 'queue-small.obj', { density: '550', units: 'km', name: 'Queue pair — small lobe' })).json
    recordId = (await as.analyst.post('/api/objects', { designation: '2064 BQ2', name: 'Queue pair' })).json.id
  })
  afterAll(async () => {
    await browser?.close()
    await server?.dispose()
  })

  /** Waits until Vue has taken over the server-rendered page (form controls are bound). */
  async function hydrated(page: import('playwright-core').Page) {
    await page.waitForFunction(() => !!(document.querySelector('#__nuxt') as { __vue_app__?: unknown } | null)?.__vue_app__)
    await page.waitForLoadState('networkidle')
  }

  async function signIn(email: string, next: string) {
    await browser.context.clearCookies()
    const page = await browser.context.newPage()
    await page.goto(`${server.url}${next}`)
    await page.waitForURL(/\/sign-in/)
    await page.getByLabel('E-mail').fill(email)
    await page.getByLabel('Password').fill('isthmus-demo')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.waitForURL(u => !u.pathname.startsWith('/sign-in'))
    await hydrated(page)
    return page
  }

  it('a new record\'s history starts with its creation and says in words that nothing else happened', async () => {
    const page = await signIn('analyst@example.org', `/objects/${recordId}`)
    await expect.poll(() => page.getByTestId('history-empty').innerText()).toMatch(/Nothing has happened since the record was created/)
    expect(await page.getByTestId('history').locator('li').count()).toBe(1)
    expect(await page.getByTestId('history').locator('li').first().getAttribute('data-kind')).toBe('created')
    expect(await page.getByTestId('history').innerText()).toMatch(/created[\s\S]*2064 BQ2 \(Queue pair\) created[\s\S]*Tomas Lindqvist|created[\s\S]*by Tomas Lindqvist/)
    await page.close()
  })

  it('attaching from a lobe page requires a subject: none is preselected, the suggestion names this lobe, never the whole body', async () => {
    const page = await signIn('analyst@example.org', `/lobes/${lobeA.id}`)
    await page.getByTestId('attach-open').click()
    const dialog = page.getByRole('dialog')
    await expect.poll(() => dialog.locator('select[name="record"] option').allInnerTexts()).toContain('2064 BQ2 — Queue pair')
    await dialog.locator('select[name="record"]').selectOption({ label: '2064 BQ2 — Queue pair' })
    expect(await dialog.locator('select[name="subject"]').inputValue()).toBe('')
    await expect.poll(() => dialog.getByTestId('subject-suggestion').innerText()).toContain('lobe A — this lobe, “Queue pair — large lobe”')
    expect(await dialog.getByTestId('subject-suggestion').innerText()).not.toMatch(/whole body/i)
    // Nothing can be picked or proposed before the subject is confirmed.
    expect(await dialog.getByLabel('Mass', { exact: true }).isDisabled()).toBe(true)
    expect(await dialog.getByRole('button', { name: /^Propose/ }).isDisabled()).toBe(true)
    await page.screenshot({ path: `${shots}/1-attach-no-subject.png` })
    await dialog.getByRole('button', { name: 'Use lobe A' }).click()
    expect(await dialog.locator('select[name="subject"]').inputValue()).toBe('lobe-a')
    for (const q of ['Volume', 'Mass', 'Surface area']) await dialog.getByLabel(q, { exact: true }).check()
    await dialog.getByRole('button', { name: 'Propose 3 values for lobe A' }).click()
    await expect.poll(() => dialog.getByTestId('attach-done').innerText()).toMatch(/Proposed 3 values for 2064 BQ2[\s\S]*Mass\s+lobe A/i)
    await page.screenshot({ path: `${shots}/2-attach-done.png` })
    await page.close()

    // lobe B from its page: the record now knows lobe A, so lobe B is suggested.
    const pageB = await signIn('analyst@example.org', `/lobes/${lobeB.id}`)
    await pageB.getByTestId('attach-open').click()
    const dialogB = pageB.getByRole('dialog')
    await expect.poll(() => dialogB.locator('select[name="record"] option').allInnerTexts()).toContain('2064 BQ2 — Queue pair')
    await dialogB.locator('select[name="record"]').selectOption({ label: '2064 BQ2 — Queue pair' })
    await expect.poll(() => dialogB.getByTestId('subject-suggestion').innerText()).toContain('lobe B — this lobe, “Queue pair — small lobe”')
    await dialogB.locator('select[name="subject"]').selectOption('lobe-b')
    for (const q of ['Volume', 'Mass']) await dialogB.getByLabel(q, { exact: true }).check()
    await dialogB.getByRole('button', { name: 'Propose 2 values for lobe B' }).click()
    await expect.poll(() => dialogB.getByTestId('attach-done').innerText()).toMatch(/Proposed 2 values/)
    await pageB.close()
    // and one misfiled value, for the reviewer's warning
    expect((await as.analyst.post(`/api/objects/${recordId}/attachments`, { lobe: lobeB.id, subject: 'whole-body', quantities: ['J2'] })).status).toBe(201)
  })

  it('the review queue lists, filters and bulk-decides; the record page shows the decisions and the history from creation', async () => {
    const page = await signIn('reviewer@example.org', '/reviews')
    const rows = page.getByTestId('queue-row')
    await page.locator('select[name="record"]').selectOption({ label: '2064 BQ2 (6)' })
    await expect.poll(() => rows.count()).toBe(6)
    await expect.poll(() => new URL(page.url()).searchParams.get('record')).toBe(String(recordId))
    const table = page.getByTestId('queue-table')
    await expect.poll(() => table.innerText()).toMatch(/lobe B[\s\S]*whole body/i)
    expect(await table.getByTestId('subject-warning').innerText()).toMatch(/filed as the whole body, but this record has two lobes/)
    await page.screenshot({ path: `${shots}/3-queue.png`, fullPage: true })

    // filter by quantity: the two masses
    await page.locator('select[name="quantity"]').selectOption('mass')
    await expect.poll(() => rows.count()).toBe(2)
    await page.locator('select[name="age"]').selectOption('older-than-week')
    await expect.poll(() => page.getByTestId('queue-empty').innerText()).toContain('with these filters')
    await page.locator('select[name="age"]').selectOption('')
    await page.locator('select[name="quantity"]').selectOption('')
    await expect.poll(() => rows.count()).toBe(6)

    // Reject the misfiled J2 and lobe B's volume with one comment, then accept the other four at once.
    const data = (await as.reviewer.get(`/api/reviews?record=${recordId}`)).json.items as any[]
    const j2 = data.find(i => i.quantityKey === 'J2')
    const volB = data.find(i => i.quantityKey === 'volume' && i.subject === 'lobe-b')
    await page.locator(`tr[data-attachment="${j2.id}"] input[type="checkbox"]`).check()
    await page.locator(`tr[data-attachment="${volB.id}"] input[type="checkbox"]`).check()
    await page.getByTestId('bulk-reject').click()
    await expect.poll(() => page.getByRole('alert').innerText()).toMatch(/Say why/)
    await page.getByTestId('bulk-comment').fill('J2 of one lobe is not the whole body; lobe B volume needs the patched mesh.')
    await page.getByTestId('bulk-reject').click()
    await expect.poll(() => page.getByTestId('bulk-result').innerText()).toContain('0 accepted, 2 rejected')
    await expect.poll(() => rows.count()).toBe(4)
    await page.getByTestId('queue-select-all').check()
    await page.getByTestId('bulk-comment').fill('Mesh report checked.')
    await page.getByTestId('bulk-accept').click()
    await expect.poll(() => page.getByTestId('bulk-result').innerText()).toContain('4 accepted, 0 rejected')
    await expect.poll(() => page.getByTestId('queue-empty').isVisible()).toBe(true)
    await page.screenshot({ path: `${shots}/4-queue-decided.png`, fullPage: true })

    await page.goto(`${server.url}/objects/${recordId}`)
    await hydrated(page)
    const current = page.getByTestId('current-values').locator('tbody tr')
    await expect.poll(() => current.count()).toBe(4)
    expect(await page.getByTestId('current-values').innerText()).toMatch(/lobe A[\s\S]*lobe B/i)
    const history = page.getByTestId('history')
    const kinds = await history.locator('li').evaluateAll(lis => lis.map(li => li.getAttribute('data-kind')))
    expect(kinds.at(-1)).toBe('created')
    expect(kinds.filter(k => k === 'accepted')).toHaveLength(4)
    expect(kinds.filter(k => k === 'rejected')).toHaveLength(2)
    expect(kinds.filter(k => k === 'proposed')).toHaveLength(6)
    expect(await history.innerText()).toContain('J2 of one lobe is not the whole body')
    expect(await page.getByTestId('history-empty').count()).toBe(0)
    await page.screenshot({ path: `${shots}/5-record.png`, fullPage: true })
    await page.close()
  })
})
