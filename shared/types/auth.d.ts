// The sealed session cookie carries the member's id and display name only; the role is read
// from the database on every request.
declare module '#auth-utils' {
  interface User {
    id: number
    name: string
  }
}
export {}
