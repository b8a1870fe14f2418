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

export function clientIp(event: H3Event): string {
  return getRequestIP(event, { xForwardedFor: process.env.ISTHMUS_TRUST_PROXY === '1' }) ?? 'unknown'
}
