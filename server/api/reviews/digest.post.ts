/**
 * Sends the proposal digest now (admin) to the members who chose a daily digest, whether or not a
 * day has passed since their last one; the server also sends it on its own schedule. Answers the
 * members mailed and how many values each digest listed.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'admin')
  const result = await sendProposalDigests(event, { force: true })
  await audit(event, { actorId: actor.id, action: 'record.digest-run', detail: { sent: result.sent.length } })
  return result
})
