import type { User } from '../db/schema'

/** The public view of a member (never the password hash). */
export function memberView(u: User) {
  return { id: u.id, email: u.email, name: u.name, role: u.role, active: u.active, lastSignInAt: u.lastSignInAt, createdAt: u.createdAt }
}
