import type { Access } from './route-access'

/** Rows for the contact-study routes. */
export const STUDY_ROUTE_ACCESS: Record<string, Access> = {}
