/** Member roles, from least to most trusted. An admin may do everything any other role may do. */
export const ROLES = ['viewer', 'reviewer', 'analyst', 'admin'] as const
export type Role = (typeof ROLES)[number]

export const ROLE_LABELS: Record<Role, string> = {
  viewer: 'Viewer — reads records, lobes and studies',
  reviewer: 'Reviewer — accepts or rejects proposed values, comments',
  analyst: 'Analyst — uploads meshes, runs studies, proposes values',
  admin: 'Admin — manages members and roles, and may do all of the above',
}

/** True when `role` passes a check that asks for `required` (admins pass every check). */
export function roleSatisfies(role: Role, required: Role): boolean {
  return role === required || role === 'admin' || required === 'viewer'
}
