import { readFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Agent } from './support/http'
import { startServer, type RunningServer } from './support/server'

// Routes that are framework plumbing, not part of the documented API.
const UNDOCUMENTED = new Set(['/api/_auth/session'])

describe('the OpenAPI document', () => {
  let server: RunningServer
  beforeAll(async () => {
    server = await startServer()
  })
  afterAll(() => server?.dispose())

  it('is served publicly and documents every API route of the built server with its method', async () => {
    const res = await new Agent(server.url).get('/api/openapi.json')
    expect(res.status).toBe(200)
    expect(res.json.openapi).toMatch(/^3\.1/)
    const routes = (JSON.parse(readFileSync('.output/server/routes.json', 'utf8')) as { route: string, method: string }[])
      .filter(r => r.route.startsWith('/api/') && !UNDOCUMENTED.has(r.route))
    const missing = routes.filter((r) => {
      const path = r.route.replace(/:(\w+)/g, '{$1}')
      return !res.json.paths[path]?.[r.method.toLowerCase()]
    }).map(r => `${r.method} ${r.route}`)
    expect(missing).toEqual([])
  })
})
