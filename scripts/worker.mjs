#!/usr/bin/env node
// `npm run worker`: a worker process of the distributed job engine (server/workers/task-process.ts).
// Needs REDIS_URL, and the mesh store the app uses (the same UPLOADS_DIR folder, or S3_ENDPOINT,
// S3_BUCKET and credentials). Runs the built bundle: `npm run build` (or `npm run demo`) first.
import { existsSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..')
const workers = process.env.ISTHMUS_WORKERS_DIR || join(root, '.output/server/workers')
const entry = join(workers, 'task-process.mjs')
if (!existsSync(entry)) {
  console.error(`[isthmus worker] ${entry} is missing: build the app first (npm run build)`)
  process.exit(1)
}
// The worker threads start from the same folder.
process.env.ISTHMUS_WORKERS_DIR = workers
await import(pathToFileURL(entry).href)
