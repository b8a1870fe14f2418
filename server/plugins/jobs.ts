// Background work interrupted by a stop is marked failed (and surface fields restarted) once the
// database is ready.
export default defineNitroPlugin(() => {
  onServerReady(recoverSurfaceJobs)
  onServerReady(recoverStudies)
})
