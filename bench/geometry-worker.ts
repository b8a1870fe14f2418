/** Worker for bench/geometry.ts: the server's surface-field job kernel (`surfaceFieldWithEscape`) on a slice of the points. */
import { parentPort, workerData } from 'node:worker_threads'
import { preparePolyhedron, surfaceFieldWithEscape } from '#shared/geometry'

interface Job {
  positions: Float64Array
  indices: Uint32Array
  points: Float64Array
  normals: Float64Array
  density: number
  omega: [number, number, number] | null
  start: number
  end: number
}
const { positions, indices, points, normals, density, omega, start, end } = workerData as Job
const model = preparePolyhedron({ positions, indices })
// The server hands each worker its own slice of points (server/utils/lobes.ts), as here.
const out = surfaceFieldWithEscape(model, density, points.slice(3 * start, 3 * end), normals.slice(3 * start, 3 * end), omega ? { omega } : null)
parentPort!.postMessage({ start, end, gravity: out.gravity, slopeDeg: out.slopeDeg, potential: out.potential, escape: out.escape })
