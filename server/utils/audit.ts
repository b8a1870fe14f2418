import type { H3Event } from 'h3'

export interface AuditInput {
  actorId: number | null
  action: string
  subjectType?: string
  subjectId?: string | number
  detail?: Record<string, unknown>
}

/** Records who did what, when. Every membership, sign-in, mail-link and review event goes here. */
export async function audit(event: H3Event | null, input: AuditInput, db: Pick<DB, 'insert'> = useDB()) {
  await db.insert(schema.auditEvents).values({
    actorId: input.actorId,
    action: input.action,
    subjectType: input.subjectType,
    subjectId: input.subjectId === undefined ? undefined : String(input.subjectId),
    detail: input.detail,
    ip: event ? clientIp(event) : null,
  })
}

/**
 * The client's address. With `ISTHMUS_TRUST_PROXY=1` it is the rightmost `X-Forwarded-For` entry:
 * the one our reverse proxy appended. Entries to its left come from the client and can be forged.
 */
export function clientIp(event: H3Event): string {
  if (useConfig().trustProxy) {
    const hops = (getRequestHeader(event, 'x-forwarded-for') ?? '').split(',').map(h => h.trim()).filter(Boolean)
    if (hops.length) return hops.at(-1)!
  }
  return getRequestIP(event) ?? 'unknown'
}
