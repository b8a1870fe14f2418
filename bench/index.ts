/**
 * `npm run bench [-- name ...]`: runs the benchmark scripts one after another and prints their
 * figures. Names: geometry, gravity, api, contact, records, viewer, load, jobs (default: all). Speed and memory targets
 * are checked here, never in the test suite.
 */
const suites: Record<string, () => Promise<unknown>> = {
  geometry: async () => (await import('./geometry')).runGeometryBench(),
  gravity: async () => (await import('./gravity')).runGravityBench(),
  api: async () => (await import('./api')).runApiBench(),
  contact: async () => (await import('./contact')).runContactBench(),
  records: async () => (await import('./records')).runRecordsBench(),
  viewer: async () => (await import('./viewer')).runViewerBench(),
  load: async () => (await import('./load')).runLoadBench(),
  jobs: async () => (await import('./jobs')).runJobsBench(),
}
const wanted = process.argv.slice(2).filter(a => !a.startsWith('-'))
const names = wanted.length ? wanted : Object.keys(suites)
for (const name of names) {
  const run = suites[name]
  if (!run) {
    console.error(`unknown bench "${name}" (have: ${Object.keys(suites).join(', ')})`)
    process.exit(2)
  }
  const t = performance.now()
  console.info(`\n######## ${name} ########`)
  await run()
  console.info(`(${name}: ${((performance.now() - t) / 1000).toFixed(1)} s)`)
}
