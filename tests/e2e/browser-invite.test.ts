import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openBrowser } from './support/browser'
import { startServer, type RunningServer } from './support/server'

describe('in a real browser: an admin invites an analyst who joins and signs in', () => {
  let server: RunningServer
  let browser: Awaited<ReturnType<typeof openBrowser>>
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1' })
    browser = await openBrowser()
  })
  afterAll(async () => {
    await browser?.close()
    await server?.dispose()
  })

  it('invites, reads the mail drop, accepts in a fresh context, signs in as the new analyst', async () => {
    const page = await browser.context.newPage()
    await page.goto(`${server.url}/admin/members`)
    await page.waitForURL(/\/sign-in/)
    await page.getByLabel('E-mail').fill('admin@example.org')
    await page.getByLabel('Password').fill('isthmus-demo')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.waitForURL(/\/admin\/members/)
    await expect.poll(() => page.getByTestId('members-table').innerText()).toContain('analyst@example.org')

    await page.getByLabel('E-mail').fill('new.analyst@example.org')
    await page.getByLabel('Role', { exact: true }).selectOption('analyst')
    await page.getByRole('button', { name: 'Send invitation' }).click()
    await expect.poll(() => page.getByRole('status').first().innerText()).toContain('new.analyst@example.org')

    await page.getByRole('link', { name: 'Mail drop' }).click()
    await page.waitForURL(/\/admin\/mail-drop/)
    await page.getByRole('button', { name: /invited to an Isthmus team/ }).first().click()
    const link = await page.getByTestId('mail-body').getByRole('link').first().getAttribute('href')
    expect(link).toMatch(new RegExp(`^${server.url}/join/`))
    await page.screenshot({ path: 'test-results/mail-drop.png' }).catch(() => undefined)

    // A fresh browser profile: nobody is signed in there.
    const fresh = await openBrowser()
    const joinPage = await fresh.context.newPage()
    await joinPage.goto(link!)
    await expect.poll(() => joinPage.locator('main').innerText()).toContain('new.analyst@example.org')
    await joinPage.getByLabel(/Your name/).fill('Imre Vasquez')
    await joinPage.getByLabel(/Password/).fill('a-brand-new-pass')
    await joinPage.getByRole('button', { name: 'Join' }).click()
    await joinPage.waitForURL(`${server.url}/`)
    await expect.poll(() => joinPage.getByTestId('account-link').innerText()).toContain('Imre Vasquez')

    await joinPage.getByRole('button', { name: 'Sign out' }).click()
    await joinPage.waitForURL(/\/sign-in/)
    await joinPage.getByLabel('E-mail').fill('new.analyst@example.org')
    await joinPage.getByLabel('Password').fill('a-brand-new-pass')
    await joinPage.getByRole('button', { name: 'Sign in' }).click()
    await joinPage.waitForURL(`${server.url}/`)
    await expect.poll(() => joinPage.getByTestId('account-link').innerText()).toMatch(/Imre Vasquez\s*analyst/i)
    await fresh.close()
  })
})
