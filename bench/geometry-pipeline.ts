/**
 * Child process of the geometry bench (bench/geometry.ts bundles this file and runs it with plain
 * Node): read + validate + mass properties of one mesh file, 3 rounds, each on a fresh read of the
 * file; prints JSON with per-stage times, the peak RSS after the first run and after all three, and the
 * RSS before the first read.
 */
import { readFileSync } from 'node:fs'
import { massProperties, readMesh, validateMesh, warmPipeline } from '#shared/geometry'

function pipelinePhase(path: string, warm: boolean): void {
  // 'warm': first the start-up warm-up the server's analysis worker does
  if (warm) warmPipeline()
  const baseRssMB = process.memoryUsage().rss / 2 ** 20
  const rounds: { read: number, validate: number, mass: number }[] = []
  let firstRunMaxRssMB = 0
  for (let r = 0; r < 3; r++) {
    const bytes = readFileSync(path)
    const t0 = performance.now()
    const { mesh } = readMesh(bytes)
    const t1 = performance.now()
    const v = validateMesh(mesh)
    const t2 = performance.now()
    massProperties(v.mesh, { density: 1000, components: { label: v.componentLabels, count: v.report.components } })
    const t3 = performance.now()
    rounds.push({ read: t1 - t0, validate: t2 - t1, mass: t3 - t2 })
    // The peak of one cold run (what one upload costs), before later rounds pile up garbage.
    if (r === 0) firstRunMaxRssMB = process.resourceUsage().maxRSS / 1024
  }
  const maxRssMB = process.resourceUsage().maxRSS / 1024
  process.stdout.write(JSON.stringify({ rounds, maxRssMB, firstRunMaxRssMB, baseRssMB }))
}

pipelinePhase(process.argv[2]!, process.argv[3] === 'warm')
