#!/usr/bin/env node
// `npm run demo`: builds the app when the build is missing or older than the sources, then serves
// it with the embedded defaults — SQLite file in ./data, demo team and lobes, local mail drop.
import { spawn, spawnSync } from 'node:child_process'
import { existsSync, readdirSync, statSync } from 'node:fs'
import { join } from 'node:path'

const SOURCES = ['pages', 'components', 'layouts', 'stores', 'server', 'shared', 'assets', 'composables', 'middleware', 'plugins', 'utils', 'app.vue', 'error.vue', 'nuxt.config.ts', 'tailwind.config.ts', 'package.json']

function newest(path) {
  if (!existsSync(path)) return 0
  const st = statSync(path)
  if (!st.isDirectory()) return st.mtimeMs
  return Math.max(st.mtimeMs, ...readdirSync(path).map(n => newest(join(path, n))))
}

const entry = '.output/server/index.mjs'
if (!existsSync(entry) || statSync(entry).mtimeMs < Math.max(...SOURCES.map(newest))) {
  console.info('[demo] building the app (about a minute on first run)…')
  const r = spawnSync('npx', ['nuxt', 'build'], { stdio: 'inherit' })
  if (r.status !== 0) process.exit(r.status ?? 1)
}

// This launcher runs before (and outside) the server, as plain Node without TypeScript, so it sets
// the demo's environment itself; the server reads every setting through server/utils/config.ts.
const env = {
  ...process.env,
  ISTHMUS_DEMO: '1',
  // The demo admin's password is published: listen on this machine only unless HOST says otherwise.
  HOST: process.env.HOST || '127.0.0.1',
  PORT: process.env.PORT || '3000',
  DATABASE_URL: process.env.DATABASE_URL || 'file:./data/isthmus.db',
}
const shownHost = env.HOST === '127.0.0.1' ? 'localhost' : env.HOST
console.info(`[demo] Isthmus on http://${shownHost}:${env.PORT} — sign in as admin@example.org / isthmus-demo`)
if (env.HOST !== '127.0.0.1' && env.HOST !== 'localhost' && env.HOST !== '::1') {
  console.warn(`[demo] listening on ${env.HOST}: other machines can reach the demo accounts, whose password is public`)
}
const child = spawn(process.execPath, [entry], { stdio: 'inherit', env })
for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => child.kill(sig))
child.on('exit', code => process.exit(code ?? 0))
