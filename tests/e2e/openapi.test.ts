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

  it('is rendered for members at /api-reference: every documented operation, with its parameters and body fields', async () => {
    const doc = (await new Agent(server.url).get('/api/openapi.json')).json
    const member = new Agent(server.url)
    await member.signIn('root@example.org', 'root-password-123')
    const page = await member.get('/api-reference')
    expect(page.status).toBe(200)
    const html = page.text
    for (const [path, item] of Object.entries(doc.paths as Record<string, Record<string, unknown>>)) {
      for (const method of Object.keys(item).filter(k => k !== 'parameters')) expect(html, `${method} ${path}`).toContain(`data-route="${method.toUpperCase()} ${path}"`)
    }
    // the upload's multipart fields and a query parameter with its enum
    expect(html).toContain('multipart/form-data')
    expect(html).toMatch(/density<span title="required">\*<\/span>/)
    expect(html).toContain('&quot;volume&quot;')
    // a path parameter declared once for the path shows under each of its operations
    expect(html).toMatch(/data-route="PATCH \/api\/objects\/\{id\}"[\s\S]*?<td class="font-mono text-xs">id<span title="required">\*<\/span><\/td><td>path<\/td>/)
    // every named data shape, with its fields
    for (const name of Object.keys(doc.components.schemas)) expect(html, name).toContain(`data-shape="${name}"`)
    // members only, like every page but sign-in
    expect((await new Agent(server.url).get('/api-reference')).text).not.toContain('data-route=')
  })
})
