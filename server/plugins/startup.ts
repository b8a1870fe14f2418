// Start connecting, migrating and the mail drop as soon as the server boots; a failure here is
// fatal (a server that cannot reach its database or lacks its session secret must not serve).
export default defineNitroPlugin((nitro) => {
  serverReady().catch((error) => {
    console.error('[isthmus] start-up failed:', error instanceof Error ? error.message : error)
    process.exit(1)
  })
  nitro.hooks.hook('close', async () => {
    await stopLocalSmtp()
  })
})
