import type { Access } from './route-access'

/** Rows for the object-record routes (records, attachments, reviews, exports). */
export const RECORD_ROUTE_ACCESS: Record<string, Access> = {}
