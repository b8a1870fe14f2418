import { spawn, type ChildProcess } from 'node:child_process'
import { existsSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openBrowser } from './support/browser'
import { freePort } from './support/server'

/**
 * The README's demo command (`npm ci && npm run demo`, here without `npm ci`: node_modules is
 * already installed) started as a newcomer would, with only a temporary data folder and a free port
 * set. `scripts/demo.mjs` rebuilds only when a source is newer than .output; the e2e global setup has
 * just built, so a second build here is a failure, not a wait.
 */
async function startDemo(env: Record<string, string>) {
  const child: ChildProcess = spawn(process.execPath, [resolve('scripts/demo.mjs')], {
    env: { PATH: process.env.PATH ?? '', HOME: process.env.HOME ?? tmpdir(), ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
    // Own process group: stopping it ends demo.mjs and the server it started, nothing else.
    detached: true,
  })
  let output = ''
  child.stdout!.on('data', (d: Buffer) => { output += d.toString() })
  child.stderr!.on('data', (d: Buffer) => { output += d.toString() })
  const exited = new Promise<void>(r => child.once('exit', () => r()))
  const stop = async () => {
    if (child.exitCode !== null || child.signalCode !== null) return
    process.kill(-child.pid!, 'SIGTERM')
    await Promise.race([exited, new Promise(r => setTimeout(r, 5000))])
    if (child.exitCode === null && child.signalCode === null) process.kill(-child.pid!, 'SIGKILL')
    await exited
  }
  const deadline = Date.now() + 60_000
  for (;;) {
    if (output.includes('[demo] building')) {
      await stop()
      throw new Error(`demo.mjs started a second build: .output is older than the sources\n${output}`)
    }
    if (child.exitCode !== null) throw new Error(`demo exited (${child.exitCode}):\n${output}`)
    try {
      if ((await fetch(`http://127.0.0.1:${env.PORT}/api/health`)).ok) break
    }
    catch { /* not up yet */ }
    if (Date.now() > deadline) {
      await stop()
      throw new Error(`demo did not answer within 60 s:\n${output}`)
    }
    await new Promise(r => setTimeout(r, 200))
  }
  return { child, stop, log: () => output }
}

describe('the README demo command brings the app up; in a real browser an admin invites an analyst who joins and signs in', () => {
  let demo: Awaited<ReturnType<typeof startDemo>>
  let browser: Awaited<ReturnType<typeof openBrowser>>
  let dataDir: string
  let base: string
  beforeAll(async () => {
    dataDir = mkdtempSync(join(tmpdir(), 'isthmus-demo-'))
    const port = await freePort()
    // Links in mails use the default public URL, http://localhost:PORT, as printed by the demo.
    base = `http://localhost:${port}`
    demo = await startDemo({ PORT: String(port), DATABASE_URL: `file:${join(dataDir, 'isthmus.db')}`, UPLOADS_DIR: join(dataDir, 'uploads') })
    browser = await openBrowser()
  })
  afterAll(async () => {
    await browser?.close()
    await demo?.stop()
    if (dataDir) rmSync(dataDir, { recursive: true, force: true })
  })

  it('serves the demo from the temporary data folder, with the session secret generated beside the database', async () => {
    expect(demo.log()).toContain(`Isthmus on ${base}`)
    expect(demo.log()).not.toContain('[demo] building')
    const health = await (await fetch(`${base}/api/health`)).json()
    expect(health).toMatchObject({ ok: true, db: 'ok' })
    expect(existsSync(join(dataDir, 'isthmus.db'))).toBe(true)
    expect(existsSync(join(dataDir, 'session-secret'))).toBe(true)
  })

  it('invites, reads the mail drop, accepts in a fresh context, signs in as the new analyst', async () => {
    const page = await browser.context.newPage()
    await page.goto(`${base}/admin/members`)
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
    expect(link).toMatch(new RegExp(`^${base}/join/`))
    await page.screenshot({ path: 'test-results/mail-drop.png' }).catch(() => undefined)

    // A fresh browser profile: nobody is signed in there.
    const fresh = await openBrowser()
    try {
      const joinPage = await fresh.context.newPage()
      await joinPage.goto(link!)
      await expect.poll(() => joinPage.locator('main').innerText()).toContain('new.analyst@example.org')
      await joinPage.getByLabel(/Your name/).fill('Imre Vasquez')
      await joinPage.getByLabel(/Password/).fill('a-brand-new-pass')
      await joinPage.getByRole('button', { name: 'Join' }).click()
      await joinPage.waitForURL(`${base}/`)
      await expect.poll(() => joinPage.getByTestId('account-link').innerText()).toContain('Imre Vasquez')

      await joinPage.getByRole('button', { name: 'Sign out' }).click()
      await joinPage.waitForURL(/\/sign-in/)
      await joinPage.getByLabel('E-mail').fill('new.analyst@example.org')
      await joinPage.getByLabel('Password').fill('a-brand-new-pass')
      await joinPage.getByRole('button', { name: 'Sign in' }).click()
      await joinPage.waitForURL(`${base}/`)
      await expect.poll(() => joinPage.getByTestId('account-link').innerText()).toMatch(/Imre Vasquez\s*analyst/i)
    }
    finally {
      await fresh.close()
    }
  })

  it('on a phone the header is one row and the navigation folds into a menu button; bad addresses get the not-found page', async () => {
    // The admin signed in above, in this browser profile.
    const page = await browser.context.newPage()
    await page.setViewportSize({ width: 390, height: 844 })
    await page.goto(`${base}/lobes`)
    const header = page.getByTestId('site-header')
    expect((await header.boundingBox())!.height).toBeLessThanOrEqual(64)
    const button = page.getByTestId('menu-button')
    await expect.poll(() => button.getAttribute('aria-expanded')).toBe('false')
    expect(await page.getByRole('link', { name: 'Contact studies' }).count()).toBe(0)
    await button.focus()
    await page.keyboard.press('Enter')
    await expect.poll(() => button.getAttribute('aria-expanded')).toBe('true')
    await expect.poll(() => page.getByTestId('site-menu').getByRole('link', { name: 'Audit trail' }).isVisible()).toBe(true)
    await page.screenshot({ path: 'test-results/phone-menu.png' }).catch(() => undefined)
    await page.keyboard.press('Escape')
    await expect.poll(() => button.getAttribute('aria-expanded')).toBe('false')
    await expect.poll(() => page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('menu-button')
    await button.click()
    await page.getByTestId('site-menu').getByRole('link', { name: 'Contact studies' }).click()
    await page.waitForURL(`${base}/studies`)
    await expect.poll(() => button.getAttribute('aria-expanded')).toBe('false')
    // Wide screens keep the navigation in the header and show no menu button.
    await page.setViewportSize({ width: 1280, height: 900 })
    expect(await button.isVisible()).toBe(false)
    expect(await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Lobes' }).isVisible()).toBe(true)

    const missing = await page.goto(`${base}/studies/abc`)
    expect(missing!.status()).toBe(404)
    await expect.poll(() => page.getByTestId('error-page').innerText()).toContain('Not found')
    await page.getByRole('button', { name: 'All contact studies' }).click()
    await page.waitForURL(`${base}/studies`)
    await page.close()
  })

  it('stops the whole process tree (demo script and server)', async () => {
    const pid = demo.child.pid!
    await demo.stop()
    // No process of the group is left, and the port is closed.
    expect(() => process.kill(-pid, 0)).toThrow(/ESRCH/)
    await expect(fetch(`${base}/api/health`)).rejects.toThrow()
  })
})
