import { readFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Agent } from './support/http'
import { startServer, type RunningServer } from './support/server'
import { ROUTE_ACCESS, type Access } from './support/route-access'

type Who = 'anonymous' | 'viewer' | 'reviewer' | 'analyst' | 'admin'
const WHO: Who[] = ['anonymous', 'viewer', 'reviewer', 'analyst', 'admin']

/** Status class expected for `who` on a route that needs `access`. */
function expected(access: Access, who: Who): 'pass' | 401 | 403 {
  if (access === 'public') return 'pass'
  if (who === 'anonymous') return 401
  if (access === 'viewer') return 'pass'
  if (who === 'admin') return 'pass'
  if (typeof access !== 'string') return access.includes(who) ? 'pass' : 403
  // admin / reviewer / analyst: that role only (roles are not ranked).
  return who === access ? 'pass' : 403
}

describe('role matrix over every route of the built server', () => {
  let server: RunningServer
  const agents = {} as Record<Who, Agent>
  const routes = JSON.parse(readFileSync('.output/server/routes.json', 'utf8')) as { route: string, method: string }[]
  const apiRoutes = routes.filter(r => r.route.startsWith('/api/'))

  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1' })
    for (const who of WHO) {
      agents[who] = new Agent(server.url)
      if (who !== 'anonymous') await agents[who].signIn(`${who}@example.org`, 'isthmus-demo')
    }
  })
  afterAll(() => server?.dispose())

  it('has exactly one row per route in the route table (a new route without a row fails here)', () => {
    const table = new Set(Object.keys(ROUTE_ACCESS))
    const actual = new Set(apiRoutes.map(r => `${r.method} ${r.route}`))
    expect([...actual].filter(k => !table.has(k)), 'routes without a row').toEqual([])
    expect([...table].filter(k => !actual.has(k)), 'rows without a route').toEqual([])
  })

  it('gives each role exactly the allowed status on each route', async () => {
    const failures: string[] = []
    for (const { route, method } of apiRoutes) {
      const access = ROUTE_ACCESS[`${method} ${route}`]
      if (!access) continue
      // Parameters that exist nowhere: allowed callers get 404/410/422, never 401/403.
      const path = route.replace(/:id\b/g, '999999').replace(/:token\b/g, 'x'.repeat(43)).replace(/\*\*$/, 'x')
      for (const who of WHO) {
        const res = await agents[who].request(method === 'ALL' ? 'GET' : method, path, method === 'GET' || method === 'DELETE' ? undefined : {})
        const want = expected(access, who)
        const ok = want === 'pass' ? res.status !== 401 && res.status !== 403 && res.status < 500 : res.status === want
        if (!ok) failures.push(`${method} ${route} as ${who}: got ${res.status}, want ${want} (${res.text.slice(0, 120)})`)
      }
      // Signing out must not happen mid-matrix.
      if (route === '/api/session' && method === 'DELETE') {
        for (const who of WHO) if (who !== 'anonymous') await agents[who].signIn(`${who}@example.org`, 'isthmus-demo')
      }
    }
    expect(failures).toEqual([])
  })
})
