// Loads the signed-in member once per page load (on the server for SSR, state then hydrates).
export default defineNuxtPlugin(async () => {
  const session = useSessionStore()
  if (!session.loaded) await session.refresh()
})
