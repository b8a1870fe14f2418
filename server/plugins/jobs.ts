// Once the database is ready: legacy rows settled, files nobody refers to swept, interrupted jobs
// resumed, and (with Redis) this app process taking job coordinators from the job queue.
export default defineNitroPlugin(() => {
  onServerReady(recoverStudies)
  onServerReady(sweepStorage)
  onServerReady(resumeJobs)
  onServerReady(async db => startJobCoordinator(db))
})
