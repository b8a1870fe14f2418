// The proposal digest runs on a schedule: every ISTHMUS_RECORD_DIGEST_CHECK_MINUTES (default 15) the
// server mails the members who chose a daily digest and whose last digest is a day old or more.
// A failed run is logged and retried at the next check; tests trigger a run with POST /api/reviews/digest.
export default defineNitroPlugin((nitro) => {
  const minutes = useConfig().recordDigestCheckMinutes
  if (!minutes) return
  let running = false
  const timer = setInterval(async () => {
    if (running) return
    running = true
    try {
      await serverReady()
      await sendProposalDigests(null)
    }
    catch (error) {
      console.error('[isthmus] proposal digest failed:', error instanceof Error ? error.message : error)
    }
    finally {
      running = false
    }
  }, minutes * 60_000)
  timer.unref()
  nitro.hooks.hook('close', () => clearInterval(timer))
})
