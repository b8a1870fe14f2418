// Start connecting, migrating and the mail drop as soon as the server boots; a failure here is
// fatal (a server that cannot reach its database or lacks its session secret must not serve).
export default defineNitroPlugin((nitro) => {
  // Nitro only logs a failed listen (e.g. the port is taken) and would leave a server that answers
  // nobody while its mail drop and workers run on: stop instead, saying why.
  process.on('uncaughtException', (error: NodeJS.ErrnoException & { address?: string, port?: number }) => {
    if (error?.syscall !== 'listen') return
    console.error(`[isthmus] cannot listen on ${error.address ?? ''}:${error.port ?? ''} (${error.code}): set PORT or HOST, or stop what uses that address.`)
    process.exit(1)
  })
  serverReady().catch((error) => {
    console.error('[isthmus] start-up failed:', error instanceof Error ? error.message : error)
    process.exit(1)
  })
  nitro.hooks.hook('close', async () => {
    await stopLocalSmtp()
  })
})
