import { createHash, randomBytes, timingSafeEqual } from 'node:crypto'

/** A URL-safe random token of `bytes` bytes of entropy. */
export function newToken(bytes = 32): string {
  return randomBytes(bytes).toString('base64url')
}

/** sha256 hex of a token: tokens are stored only as this hash. */
export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex')
}

export function sameHash(a: string, b: string): boolean {
  const x = Buffer.from(a, 'hex')
  const y = Buffer.from(b, 'hex')
  return x.length === y.length && timingSafeEqual(x, y)
}
