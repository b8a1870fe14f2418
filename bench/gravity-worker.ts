/** Worker for bench/gravity.ts: per-face fields from a shared treecode, or coefficient sums over a face range. */
import { parentPort } from 'node:worker_threads'
import { allocateFaceFields, coefficientSums, faceFieldChunk } from '#shared/geometry'
import type { CoefficientFrame, GravityTree, Vec3 } from '#shared/geometry'

type Msg
  = | { cmd: 'fields', tree: GravityTree, points: Float64Array, normals: Float64Array, density: number, omega: Vec3 | null, start: number, end: number }
    | { cmd: 'coefficients', positions: Float64Array, indices: Uint32Array, frame: CoefficientFrame, R: number, degree: number, start: number, end: number }

parentPort!.on('message', (m: Msg) => {
  if (m.cmd === 'fields') {
    const out = allocateFaceFields(m.end - m.start)
    faceFieldChunk(m.tree, m.density, m.points, m.normals, m.omega, m.start, m.end, out, m.start)
    return parentPort!.postMessage(out, Object.values(out).map(a => a.buffer as ArrayBuffer))
  }
  const sums = coefficientSums({ positions: m.positions, indices: m.indices }, m.frame, m.R, m.degree, m.start, m.end)
  parentPort!.postMessage(sums, [sums.buffer as ArrayBuffer])
})
parentPort!.postMessage('ready')
