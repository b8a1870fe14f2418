/** Sign out (always succeeds). */
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  await clearUserSession(event)
  if (session.user?.id) await audit(event, { actorId: session.user.id, action: 'session.signed-out' })
  return { ok: true }
})
