import { spawn, type ChildProcess } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { createClient, type Client } from '@libsql/client'

export async function freePort(): Promise<number> {
  return new Promise((res, rej) => {
    const s = createServer()
    s.once('error', rej)
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address() as { port: number }
      s.close(() => res(port))
    })
  })
}

export interface RunningServer {
  url: string
  port: number
  dataDir: string
  env: Record<string, string>
  log: () => string
  /** Direct read/write access to the server's SQLite file (for checks on stored rows). */
  sql: () => Client
  stop: () => Promise<void>
  /** Ends the server at once with SIGKILL (as a power cut or the OOM killer would), without a restart. */
  crash: () => Promise<void>
  restart: () => Promise<void>
  dispose: () => Promise<void>
}

/**
 * Starts the built server (`node .output/server/index.mjs`) on a free loopback port with its own
 * data folder, database file, uploads folder and embedded SMTP server, and waits until it answers.
 */
export async function startServer(env: Record<string, string> = {}, opts: { nodeArgs?: string[] } = {}): Promise<RunningServer> {
  const dataDir = mkdtempSync(join(tmpdir(), 'isthmus-e2e-'))
  const port = await freePort()
  const fullEnv: Record<string, string> = {
    HOST: '127.0.0.1',
    PORT: String(port),
    DATABASE_URL: `file:${join(dataDir, 'isthmus.db')}`,
    UPLOADS_DIR: join(dataDir, 'uploads'),
    NUXT_SESSION_PASSWORD: 'e2e-session-password-of-at-least-32-characters',
    ISTHMUS_PUBLIC_URL: `http://127.0.0.1:${port}`,
    ISTHMUS_ADMIN_EMAIL: 'root@example.org',
    ISTHMUS_ADMIN_PASSWORD: 'root-password-123',
    ISTHMUS_DEMO_STUDY: '0',
    ...env,
  }
  let child: ChildProcess | undefined
  let output = ''
  let client: Client | undefined

  async function start() {
    child = spawn(process.execPath, [...(opts.nodeArgs ?? []), resolve('.output/server/index.mjs')], {
      env: { PATH: process.env.PATH ?? '', ...fullEnv },
      stdio: ['ignore', 'pipe', 'pipe'],
    })
    child.stdout!.on('data', (d: Buffer) => { output += d.toString() })
    child.stderr!.on('data', (d: Buffer) => { output += d.toString() })
    const deadline = Date.now() + 30_000
    while (Date.now() < deadline) {
      if (child.exitCode !== null) throw new Error(`server exited (${child.exitCode}):\n${output}`)
      try {
        const res = await fetch(`http://127.0.0.1:${port}/api/health`)
        if (res.ok) return
      }
      catch { /* not up yet */ }
      await new Promise(r => setTimeout(r, 100))
    }
    throw new Error(`server did not answer within 30 s:\n${output}`)
  }

  async function stop() {
    if (!child || child.exitCode !== null) return
    const exited = new Promise(r => child!.once('exit', r))
    child.kill('SIGTERM')
    await Promise.race([exited, new Promise(r => setTimeout(r, 5000))])
    if (child.exitCode === null) child.kill('SIGKILL')
  }

  async function crash() {
    if (!child || child.exitCode !== null) return
    const exited = new Promise(r => child!.once('exit', r))
    child.kill('SIGKILL')
    await exited
  }

  await start()
  return {
    url: `http://127.0.0.1:${port}`,
    port,
    dataDir,
    env: fullEnv,
    log: () => output,
    sql: () => (client ??= createClient({ url: fullEnv.DATABASE_URL!, timeout: 10_000 })),
    stop,
    crash,
    restart: async () => {
      await stop()
      await start()
    },
    dispose: async () => {
      client?.close()
      await stop()
      rmSync(dataDir, { recursive: true, force: true })
    },
  }
}
