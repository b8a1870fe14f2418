/**
 * Contact-study benchmark: `npx tsx bench/contact.ts`. Prints figures; targets are guidance.
 *  - first contact of two ~200 000-face lobes, BVHs cached (target ≤ 0.4 s) and cold (≤ 0.8 s)
 *  - union + intersection of two ~100 000-face lobes (≤ 1 s), with the neck search (≤ 2 s)
 *  - the full-shape mutual potential at first contact (default quadrature convergence loop)
 *  - a 200-sample spread with a direction cone on 2 worker threads (≤ 20 s)
 */
import { Worker } from 'node:worker_threads'
import { fileURLToPath } from 'node:url'
import { ContactBvhCache, createSpreadContext, findNeck, firstContact, massProperties, meshInContactFrame, mutualPotential, overlapAndUnion, perturbedEllipsoid, quatFromAxisAngle, simplifyClosed, summariseSpread } from '#shared/geometry'
import type { SpreadSample, SpreadSpec, TriMesh, Vec3 } from '#shared/geometry'

const ms = (t: number) => `${(performance.now() - t).toFixed(0)} ms`

async function lobe(a: number, b: number, c: number, seed: number, faces: number): Promise<TriMesh> {
  return (await simplifyClosed(perturbedEllipsoid(a, b, c, 7, seed, 0.06), faces)).mesh
}

export async function runContactBench(): Promise<Record<string, number>> {
  const fig: Record<string, number> = {}
  const A = await lobe(1500, 1100, 900, 1, 200_000), B = await lobe(1000, 800, 700, 2, 200_000)
  const pA = massProperties(A, { density: 1000 }), pB = massProperties(B, { density: 1000 })
  console.log(`lobes: ${A.indices.length / 3} and ${B.indices.length / 3} faces`)
  const dirs: Vec3[] = [[1, 0, 0], [0.6, 0.7, 0.2], [0.2, -0.5, 0.8], [-0.7, 0.3, -0.4]]
  const q = quatFromAxisAngle([0.3, 1, 0.2], 0.9)
  // Cold: a fresh cache per call (two BVH builds included).
  let t = performance.now()
  firstContact({ meshA: A, meshB: B, centroidA: pA.centroid, centroidB: pB.centroid, orientationB: q, direction: dirs[0] }, { cache: new ContactBvhCache() })
  fig.firstContactColdMs = performance.now() - t
  console.log(`first contact, cold (2 BVH builds): ${ms(t)}`)
  const cache = new ContactBvhCache()
  cache.get(A); cache.get(B)
  for (const d of dirs) {
    t = performance.now()
    const r = firstContact({ meshA: A, meshB: B, centroidA: pA.centroid, centroidB: pB.centroid, orientationB: q, direction: d }, { cache })
    const dt = performance.now() - t
    fig.firstContactCachedMaxMs = Math.max(fig.firstContactCachedMaxMs ?? 0, dt)
    console.log(`first contact, cached, dir ${d.join(',')}: ${dt.toFixed(0)} ms (d = ${r.separation.toFixed(4)} m, ${r.diagnostics.pairsVisited} node pairs)`)
  }
  // Union + neck, 100k-face lobes.
  const A1 = await lobe(1500, 1100, 900, 3, 100_000), B1 = await lobe(1000, 800, 700, 4, 100_000)
  const pA1 = massProperties(A1, { density: 1000 }), pB1 = massProperties(B1, { density: 1000 })
  const fc = firstContact({ meshA: A1, meshB: B1, centroidA: pA1.centroid, centroidB: pB1.centroid, orientationB: q, direction: [1, 0.2, 0.1] })
  const Ac = meshInContactFrame(A1, pA1.centroid)
  const depth = 0.1 * Math.min(pA1.equivalentRadius, pB1.equivalentRadius)
  t = performance.now()
  const ov = await overlapAndUnion(Ac, B1, fc.poseB, fc.direction, depth)
  fig.unionIntersectionMs = performance.now() - t
  console.log(`union + intersection (${A1.indices.length / 3} + ${B1.indices.length / 3} faces → union ${ov.union.indices.length / 3}): ${ms(t)}`)
  const t2 = performance.now()
  const cB: Vec3 = fc.direction.map(x => x * (fc.separation - depth)) as Vec3
  const neck = findNeck(ov.union, [0, 0, 0], cB, fc.point, Math.min(pA1.equivalentRadius, pB1.equivalentRadius))
  fig.neckSearchMs = performance.now() - t2
  fig.unionAndNeckMs = performance.now() - t
  console.log(`neck search (${neck.evaluations} sections, tilt ${neck.tiltDeg.toFixed(1)}°, r_eq ${neck.equivalentRadius.toFixed(1)} m): ${ms(t2)}; union + neck ${ms(t)}`)
  // Full-shape mutual potential at first contact, default settings (lobes simplified to 1000 faces,
  // order raised until successive orders differ by < 1e-4, at most 5).
  t = performance.now()
  const mp = await mutualPotential(A1, 1000, pA1.centroid, B1, 1000, fc.poseB)
  fig.mutualPotentialMs = performance.now() - t
  console.log(`full-shape mutual potential (${mp.sourceFacesA}/${mp.sourceFacesB} faces → ${mp.facesA}/${mp.facesB}): ${ms(t)}, order ${mp.order}, relative change ${mp.convergence?.toExponential(2)} (${mp.converged ? 'converged' : 'NOT converged'} at ${mp.tolerance})`)
  // Spread: 200 samples on 2 worker threads, ~20k-face lobes, 25° cone, neck per sample.
  const As = await lobe(1500, 1100, 900, 5, 20_000), Bs = await lobe(1000, 800, 700, 6, 20_000)
  const spec: SpreadSpec = { seed: 2024, samples: 200, densityA: { kind: 'normal', mean: 1200, std: 300 }, densityB: { kind: 'uniform', min: 600, max: 2000 }, coneHalfAngleDeg: 25, scale: { kind: 'normal', mean: 1, std: 0.05 } }
  const base = { orientationB: q, direction: [1, 0.2, 0.1] as Vec3, orbit: { kind: 'bound' as const, semiMajorAxis: 6000, eccentricity: 0.7 }, orbitNormal: [0, 0, 1] as Vec3, overlapDepth: 60, massModel: 'conserve-mass' as const, spec }
  createSpreadContext({ ...base, meshA: As, meshB: Bs })
  t = performance.now()
  const worker = new URL('./contact-spread-worker.mjs', import.meta.url)
  const half = spec.samples / 2
  const parts = await Promise.all([0, 1].map(k => new Promise<SpreadSample[]>((resolve, reject) => {
    const w = new Worker(fileURLToPath(worker), { workerData: { meshA: As, meshB: Bs, base, from: k * half, to: (k + 1) * half } })
    w.once('message', resolve); w.once('error', reject)
  })))
  const summary = summariseSpread(spec, parts.flat())
  fig.spread200Ms = performance.now() - t
  console.log(`spread, 200 samples, 2 workers (${As.indices.length / 3}-face lobes, 25° cone, neck per sample): ${ms(t)}`)
  console.log(`  speed m/s median ${summary.speed?.median.toFixed(3)} [${summary.speed?.min.toFixed(3)}, ${summary.speed?.max.toFixed(3)}], spin period h median ${((summary.spinPeriod?.median ?? NaN) / 3600).toFixed(2)}, neck r m median ${summary.neckRadius?.median.toFixed(1)}, J2 median ${summary.mergedJ2?.median.toFixed(3)}, contacts ${summary.contacts}/${summary.samples}`)
  return fig
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  runContactBench().then(f => console.log(JSON.stringify(f)))
}
