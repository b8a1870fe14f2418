// Requests wait for start-up (database open and migrated) instead of racing it.
export default defineEventHandler(async () => {
  await serverReady()
})
