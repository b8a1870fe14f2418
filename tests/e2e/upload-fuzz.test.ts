import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Agent } from './support/http'
import { uploadLobe } from './support/lobes'
import { mutatedMeshes } from './support/mutate'
import { startServer, type RunningServer } from './support/server'

/**
 * Mutated mesh files through the real upload route: every answer is 201 or a documented 4xx with a
 * message, never a 5xx, and the server keeps answering. (The core's own fuzz loop of a few
 * thousand files runs in tests/unit/geometry; `scripts/fuzz-uploads.ts` runs longer loops.)
 */
describe('upload fuzzing through the API', () => {
  let server: RunningServer
  let analyst: Agent
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '100', ISTHMUS_MAX_UPLOAD_MB: '1' })
    analyst = new Agent(server.url)
    await analyst.signIn('analyst@example.org', 'isthmus-demo')
  })
  afterAll(() => server?.dispose())

  it('answers 201 or a 4xx with a message for 150 mutated files, and stays up', async () => {
    const statuses = new Map<number, number>()
    let i = 0
    for (const { bytes, name } of mutatedMeshes(150, 20261201)) {
      i++
      const res = await uploadLobe(analyst, bytes, name, { density: '1000', units: 'm' })
      statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1)
      expect(res.status === 201 || (res.status >= 400 && res.status < 500), `case ${i}: ${res.status} ${res.text.slice(0, 200)}`).toBe(true)
      if (res.status !== 201) expect(typeof res.json?.message).toBe('string')
    }
    expect((statuses.get(422) ?? 0)).toBeGreaterThan(10)
    expect((await analyst.get('/api/health')).json.ok).toBe(true)
  })
})
