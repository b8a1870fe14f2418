import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { expect } from 'vitest'
import { chromium, type BrowserContext } from 'playwright-core'

export const CHROMIUM = process.env.CHROMIUM_PATH || '/usr/bin/chromium'

/**
 * A fresh Debian-chromium profile (playwright-core never downloads a browser). WebGL renders with
 * SwiftShader, so no GPU is needed.
 */
export async function openBrowser(): Promise<{ context: BrowserContext, close: () => Promise<void> }> {
  const profile = mkdtempSync(join(tmpdir(), 'isthmus-chromium-'))
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: { width: 1280, height: 900 },
    args: ['--headless', '--no-sandbox', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-quic', '--use-angle=swiftshader', '--enable-unsafe-swiftshader'],
  })
  return {
    context,
    close: async () => {
      await context.close()
      rmSync(profile, { recursive: true, force: true })
    },
  }
}

/** Signs the browser's context in (a session cookie for its pages), as the demo analyst unless told. */
export async function signInBrowser(context: BrowserContext, serverUrl: string, email = 'analyst@example.org', password = 'isthmus-demo'): Promise<void> {
  const res = await context.request.post(`${serverUrl}/api/session`, { data: { email, password }, headers: { origin: serverUrl } })
  expect(res.status()).toBe(200)
}
