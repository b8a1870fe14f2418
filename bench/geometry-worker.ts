/** Worker for bench/geometry.ts: surface field of a chunk of points (the server's worker-pool kernel). */
import { parentPort, workerData } from 'node:worker_threads'
import { preparePolyhedron, surfaceFieldChunk } from '../shared/geometry/gravity'

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
const n = points.length / 3
const out = { gravity: new Float64Array(n), slopeDeg: new Float64Array(n), potential: new Float64Array(n) }
surfaceFieldChunk(model, density, points, normals, omega ? { omega } : null, start, end, out)
parentPort!.postMessage({ start, end, gravity: out.gravity.slice(start, end), slopeDeg: out.slopeDeg.slice(start, end), potential: out.potential.slice(start, end) })
