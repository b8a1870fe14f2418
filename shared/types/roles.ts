/** Member roles, from least to most trusted. An admin may do everything any other role may do. */
export const ROLES = ['viewer', 'reviewer', 'analyst', 'admin'] as const
export type Role = (typeof ROLES)[number]

export const ROLE_LABELS: Record<Role, string> = {
  viewer: 'Viewer — reads records, lobes and studies',
  reviewer: 'Reviewer — accepts or rejects proposed values, comments',
  analyst: 'Analyst — uploads meshes, runs studies, proposes values, comments',
  admin: 'Admin — manages members and roles, and may do all of the above',
}

/** Roles that may comment on a value: reviewers discuss it, analysts answer on their own values. Viewers read only. */
export const COMMENT_ROLES = ['analyst', 'reviewer'] as const satisfies readonly Role[]

/**
 * True when `role` passes a check that asks for `required`: one role, or any of a list. Roles are
 * not ranked: `reviewer` and `analyst` are separate duties; `viewer` means any member and admins
 * pass every check.
 */
export function roleSatisfies(role: Role, required: Role | readonly Role[]): boolean {
  if (role === 'admin') return true
  if (typeof required !== 'string') return required.includes(role)
  return role === required || required === 'viewer'
}
