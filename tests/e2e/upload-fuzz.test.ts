import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Agent } from './support/http'
import { uploadLobe } from './support/lobes'
import { mutatedMeshes } from './support/mutate'
import { startServer, type RunningServer } from './support/server'

/** Mutated files sent through the real upload route (≈ 20 s here on 2 cores; `scripts/fuzz-uploads.ts` runs longer loops). */
const CASES = 3000
/** Requests in flight at once: keeps both cores busy (client + server main thread + one worker). */
const IN_FLIGHT = 4

/**
 * Mutated mesh files through the real upload route: every answer is 201 or a documented 4xx whose
 * message says what is wrong, never a 5xx, and the server keeps answering. The surface-field budget
 * is the smallest the server allows (100 points) and the seed meshes have 80 faces, so accepted
 * uploads cost little background work.
 */
describe('upload fuzzing through the API', () => {
  let server: RunningServer
  let analyst: Agent
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '100', ISTHMUS_DISPLAY_FACES: '1000', ISTHMUS_MAX_UPLOAD_MB: '1' })
    analyst = new Agent(server.url)
    await analyst.signIn('analyst@example.org', 'isthmus-demo')
  })
  afterAll(() => server?.dispose())

  it(`answers 201 or a 4xx naming the problem for ${CASES} mutated files, and stays up`, async () => {
    const started = Date.now()
    const statuses = new Map<number, number>()
    const failures: string[] = []
    const cases = [...mutatedMeshes(CASES, 20261201)]
    let next = 0
    async function lane() {
      while (next < cases.length) {
        const i = next++
        const { bytes, name } = cases[i]!
        const res = await uploadLobe(analyst, bytes, name, { density: '1000', units: 'm' })
        statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1)
        const message: unknown = res.json?.message
        if (res.status === 201) {
          if (!(res.json?.faceCount > 0 && res.json?.properties?.volume > 0)) failures.push(`case ${i}: 201 without properties: ${res.text.slice(0, 200)}`)
        }
        else if (!(res.status >= 400 && res.status < 500)) failures.push(`case ${i}: ${res.status} ${res.text.slice(0, 300)}`)
        // A message that says what is wrong: more than the bare status text.
        else if (typeof message !== 'string' || message.length < 12 || /^(bad request|unprocessable entity|internal server error)$/i.test(message)) {
          failures.push(`case ${i}: ${res.status} without a useful message: ${res.text.slice(0, 300)}`)
        }
      }
    }
    await Promise.all(Array.from({ length: IN_FLIGHT }, lane))
    console.info(`[fuzz] ${CASES} uploads in ${((Date.now() - started) / 1000).toFixed(1)} s:`, Object.fromEntries(statuses))
    expect(failures).toEqual([])
    expect([...statuses.values()].reduce((a, b) => a + b, 0)).toBe(CASES)
    // Both outcomes occur: mutations that break the mesh, and ones the readers accept (e.g. a changed digit).
    expect(statuses.get(422) ?? 0).toBeGreaterThan(CASES / 10)
    expect(statuses.get(201) ?? 0).toBeGreaterThan(0)
    expect(server.log()).not.toMatch(/unhandled|uncaught|FATAL|heap out of memory/i)
    const health = await analyst.get('/api/health')
    expect(health.status).toBe(200)
    expect(health.json).toMatchObject({ ok: true, db: 'ok' })
  })
})
