import { and, desc, eq, isNull } from 'drizzle-orm'

/** One's personal API tokens (never the token itself). */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'viewer')
  const t = schema.apiTokens
  const items = await useDB().select({ id: t.id, label: t.label, prefix: t.prefix, lastUsedAt: t.lastUsedAt, createdAt: t.createdAt })
    .from(t).where(and(eq(t.userId, actor.id), isNull(t.revokedAt))).orderBy(desc(t.id))
  return { items, total: items.length }
})
