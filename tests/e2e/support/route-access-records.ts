import type { Access } from './route-access'

/** Rows for the object-record routes (records, attachments, reviews, exports). */
export const RECORD_ROUTE_ACCESS: Record<string, Access> = {
  'GET /api/objects': 'viewer',
  'POST /api/objects': 'analyst',
  'GET /api/objects/:id': 'viewer',
  'PATCH /api/objects/:id': 'analyst',
  'POST /api/objects/:id/attachments': 'analyst',
  'POST /api/objects/:id/follow': 'viewer',
  'DELETE /api/objects/:id/follow': 'viewer',
  'GET /api/objects/:id/export.json': 'viewer',
  'GET /api/objects/:id/export.csv': 'viewer',
  'GET /api/objects/:id/export.txt': 'viewer',
  'GET /api/objects/:id/export.bib': 'viewer',
  'GET /api/objects/:id/export.csl.json': 'viewer',
  'GET /api/attachments/preview': 'viewer',
  'POST /api/attachments/:id/review': 'reviewer',
  'GET /api/reviews': 'reviewer',
  'POST /api/reviews': 'reviewer',
  'POST /api/reviews/digest': 'admin',
  // Any member reads the discussion; reviewers and analysts (and admins) write in it, viewers do not.
  'GET /api/attachments/:id/comments': 'viewer',
  'POST /api/attachments/:id/comments': ['analyst', 'reviewer'],
  'GET /api/account/record-mail': 'viewer',
  'PATCH /api/account/record-mail': 'viewer',
}
