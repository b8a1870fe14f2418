import { existsSync } from 'node:fs'
import { spawnSync } from 'node:child_process'

/**
 * Builds the app once for all end-to-end tests (`nuxt build` → .output). Set
 * ISTHMUS_E2E_REUSE_BUILD=1 to reuse an existing build while iterating locally.
 */
export default function setup() {
  if (process.env.ISTHMUS_E2E_REUSE_BUILD === '1' && existsSync('.output/server/index.mjs')) return
  const started = Date.now()
  const result = spawnSync('npx', ['nuxt', 'build'], { stdio: ['ignore', 'pipe', 'pipe'], encoding: 'utf8', env: { ...process.env, NODE_ENV: 'production' } })
  if (result.status !== 0) {
    throw new Error(`nuxt build failed:\n${result.stdout?.slice(-4000)}\n${result.stderr?.slice(-4000)}`)
  }
  console.info(`[e2e] built the app in ${((Date.now() - started) / 1000).toFixed(1)} s`)
}
