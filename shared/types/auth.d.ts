// The sealed session cookie carries the member's id, display name and sign-in time only; the role
// is read from the database on every request.
declare module '#auth-utils' {
  interface User {
    id: number
    name: string
    /** When this session was signed in (ms since 1970): refused after a later password change. */
    signedInAt: number
  }
}
export {}
