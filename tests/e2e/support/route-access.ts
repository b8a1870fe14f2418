/**
 * Who may call each route: 'public', the role it needs ('viewer' = any signed-in member;
 * admins pass every check), or the list of roles that may. One row per route of the built server; roles.test.ts fails when a
 * route has no row or a row has no route.
 */
import { RECORD_ROUTE_ACCESS } from './route-access-records'
import { STUDY_ROUTE_ACCESS } from './route-access-studies'

type Role = 'viewer' | 'reviewer' | 'analyst' | 'admin'
/** 'public', one role, or a list of roles any of which may call (admins always may). */
export type Access = 'public' | Role | readonly Role[]

export const ROUTE_ACCESS: Record<string, Access> = {
  'GET /api/health': 'public',
  'GET /api/openapi.json': 'public',
  'POST /api/session': 'public',
  'GET /api/session': 'public',
  'DELETE /api/session': 'public',
  'GET /api/_auth/session': 'public',
  'DELETE /api/_auth/session': 'public',
  'GET /api/join/:token': 'public',
  'POST /api/join/:token': 'public',
  'POST /api/password-resets': 'public',
  'GET /api/password-resets/:token': 'public',
  'POST /api/password-resets/:token': 'public',

  'GET /api/account': 'viewer',
  'PATCH /api/account': 'viewer',
  'POST /api/account/password': 'viewer',
  'GET /api/account/tokens': 'viewer',
  'POST /api/account/tokens': 'viewer',
  'DELETE /api/account/tokens/:id': 'viewer',

  'GET /api/members': 'admin',
  'PATCH /api/members/:id': 'admin',
  'GET /api/invitations': 'admin',
  'POST /api/invitations': 'admin',
  'POST /api/invitations/:id/revoke': 'admin',
  'GET /api/mail-drop': 'admin',
  'GET /api/mail-drop/:id': 'admin',
  'GET /api/audit': 'admin',
  'GET /api/jobs': 'admin',
  'POST /api/jobs/:id/cancel': 'admin',

  // Lobes (owner-or-admin for DELETE is checked beyond the role: see lobes.test.ts).
  'GET /api/lobes': 'viewer',
  'POST /api/lobes': 'analyst',
  'GET /api/lobes/:id': 'viewer',
  'PATCH /api/lobes/:id': 'analyst',
  'DELETE /api/lobes/:id': 'analyst',
  'GET /api/lobes/:id/mesh': 'viewer',
  'GET /api/lobes/:id/fields': 'viewer',
  'GET /api/lobes/:id/fields.csv': 'viewer',
  'GET /api/lobes/:id/fields.ply': 'viewer',
  'GET /api/lobes/:id/harmonics': 'viewer',
  'GET /api/lobes/:id/export.json': 'viewer',
  'GET /api/lobes/:id/export.csv': 'viewer',

  ...STUDY_ROUTE_ACCESS,
  ...RECORD_ROUTE_ACCESS,
}
