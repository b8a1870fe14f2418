import type { Access } from './route-access'

/** Rows for the contact-study routes (owner-or-admin checks beyond the role are tested in studies.test.ts). */
export const STUDY_ROUTE_ACCESS: Record<string, Access> = {
  'GET /api/studies': 'viewer',
  'POST /api/studies': 'analyst',
  'GET /api/studies/:id': 'viewer',
  'POST /api/studies/:id/cancel': 'analyst',
  'GET /api/studies/:id/mesh': 'viewer',
  'GET /api/studies/:id/merged.obj': 'viewer',
  'GET /api/studies/:id/merged.ply': 'viewer',
  'POST /api/studies/:id/merged-lobe': 'analyst',
  'POST /api/lobes/:id/split': 'analyst',
}
