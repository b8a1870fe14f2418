// The sealed session cookie carries the member's id, display name, sign-in time and session version
// only; the role and the member's current session version are read from the database on every request.
declare module '#auth-utils' {
  interface User {
    id: number
    name: string
    /** When this session was signed in (ms since 1970): refused after a later password change. */
    signedInAt: number
    /** The member's session version at sign-in: refused once sign-out, a password change or reset, or deactivation moves it on. */
    sv: number
  }
}
export {}
