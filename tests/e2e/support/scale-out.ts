import { execFileSync } from 'node:child_process'
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import S3rver from 's3rver'
import { freePort } from './server'

/** A real Redis (Debian's redis-server) on a free loopback port, no persistence; stop() ends it by its pid. */
export async function startRedis() {
  const dir = mkdtempSync(join(tmpdir(), 'isthmus-redis-'))
  const port = await freePort()
  const pidfile = join(dir, 'redis.pid')
  execFileSync('redis-server', ['--port', String(port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no', '--daemonize', 'yes', '--pidfile', pidfile, '--dir', dir])
  const deadline = Date.now() + 10_000
  while (!existsSync(pidfile)) {
    if (Date.now() > deadline) throw new Error('redis-server did not start')
    await new Promise(r => setTimeout(r, 50))
  }
  const pid = Number(readFileSync(pidfile, 'utf8').trim())
  return {
    url: `redis://127.0.0.1:${port}`,
    stop: () => {
      try {
        process.kill(pid, 'SIGTERM')
      }
      catch { /* already gone */ }
      rmSync(dir, { recursive: true, force: true })
    },
  }
}

/** An S3-compatible fake (s3rver) on a free loopback port, with its own folder. */
export async function startS3() {
  const dir = mkdtempSync(join(tmpdir(), 'isthmus-s3-'))
  const port = await freePort()
  const server = new S3rver({ port, address: '127.0.0.1', silent: true, directory: dir })
  await server.run()
  return {
    endpoint: `http://127.0.0.1:${port}`,
    env: { S3_ENDPOINT: `http://127.0.0.1:${port}`, S3_BUCKET: 'isthmus-test', S3_ACCESS_KEY_ID: 'S3RVER', S3_SECRET_ACCESS_KEY: 'S3RVER' },
    stop: async () => {
      await server.close()
      rmSync(dir, { recursive: true, force: true })
    },
  }
}
