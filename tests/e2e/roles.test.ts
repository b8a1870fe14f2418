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

type Want = ReturnType<typeof expected>

/**
 * Routes a personal API token may not use as a session would: creating a token needs a signed-in
 * session (server/api/account/tokens/index.post.ts refuses a token with 403). Every other route
 * treats a token like the member's session (server/utils/auth.ts, requireActor).
 */
const TOKEN_EXCEPTIONS: Record<string, (who: Who) => Want> = {
  'POST /api/account/tokens': who => who === 'anonymous' ? 401 : 403,
}

describe('role matrix over every route of the built server', () => {
  let server: RunningServer
  const agents = {} as Record<Who, Agent>
  const tokenAgents = {} as Record<Who, Agent>
  const routes = JSON.parse(readFileSync('.output/server/routes.json', 'utf8')) as { route: string, method: string }[]
  const apiRoutes = routes.filter(r => r.route.startsWith('/api/'))

  async function signInAll() {
    for (const who of WHO) if (who !== 'anonymous') await agents[who].signIn(`${who}@example.org`, 'isthmus-demo')
  }

  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1' })
    for (const who of WHO) agents[who] = new Agent(server.url)
    await signInAll()
    for (const who of WHO) {
      // Anonymous carries a well-formed token that was never issued.
      let token = `ism_${'x'.repeat(43)}`
      if (who !== 'anonymous') {
        const created = await agents[who].post('/api/account/tokens', { label: 'role matrix' })
        expect(created.status, `token for ${who}`).toBe(201)
        token = created.json.token
      }
      tokenAgents[who] = new Agent(server.url, { authorization: `Bearer ${token}` })
    }
  })
  afterAll(() => server?.dispose())

  /** Calls every route as every caller; returns the mismatches. */
  async function walk(callers: Record<Who, Agent>, want: (key: string, access: Access, who: Who) => Want, afterRoute?: (key: string) => Promise<void>) {
    const failures: string[] = []
    for (const { route, method } of apiRoutes) {
      const key = `${method} ${route}`
      const access = ROUTE_ACCESS[key]
      if (!access) continue
      // Parameters that exist nowhere: allowed callers get 404/410/422, never 401/403.
      const path = route.replace(/:id\b/g, '999999').replace(/:token\b/g, 'x'.repeat(43)).replace(/\*\*$/, 'x')
      for (const who of WHO) {
        const res = await callers[who].request(method === 'ALL' ? 'GET' : method, path, method === 'GET' || method === 'DELETE' ? undefined : {})
        const w = want(key, access, who)
        const ok = w === 'pass' ? res.status !== 401 && res.status !== 403 && res.status < 500 : res.status === w
        if (!ok) failures.push(`${key} as ${who}: got ${res.status}, want ${w} (${res.text.slice(0, 120)})`)
      }
      await afterRoute?.(key)
    }
    return failures
  }

  it('has exactly one row per route in the route table (a new route without a row fails here)', () => {
    const table = new Set(Object.keys(ROUTE_ACCESS))
    const actual = new Set(apiRoutes.map(r => `${r.method} ${r.route}`))
    expect([...actual].filter(k => !table.has(k)), 'routes without a row').toEqual([])
    expect([...table].filter(k => !actual.has(k)), 'rows without a route').toEqual([])
  })

  it('gives each role exactly the allowed status on each route (session cookie)', async () => {
    const failures = await walk(agents, (_key, access, who) => expected(access, who), async (key) => {
      // Signing out (ours or nuxt-auth-utils' own route) must not carry over to the next route.
      if (key === 'DELETE /api/session' || key === 'DELETE /api/_auth/session') await signInAll()
    })
    expect(failures).toEqual([])
  })

  it('gives each role the same status with a personal API token (Authorization: Bearer), except session-only routes', async () => {
    expect(Object.keys(TOKEN_EXCEPTIONS).filter(k => !ROUTE_ACCESS[k]), 'exceptions without a route').toEqual([])
    const failures = await walk(tokenAgents, (key, access, who) => TOKEN_EXCEPTIONS[key]?.(who) ?? expected(access, who))
    expect(failures).toEqual([])
    // The tokens were used (and the unknown one was not accepted).
    const used = await server.sql().execute(`select count(*) as n from api_tokens where label = 'role matrix' and last_used_at is not null and revoked_at is null`)
    expect(Number(used.rows[0]!.n)).toBe(4)
  })
})
