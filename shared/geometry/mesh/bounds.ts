/**
 * Vertex bounding boxes on typed arrays (blocked loops, so V8 optimises them early).
 */
import { MAX_LISTED } from '../types'
import { CORNER_BLOCK } from './edges'

/** Largest entry of I (0 when empty); a small function so that it is optimised on its own. */
export function largest(I: Uint32Array): number {
  let m = 0
  for (let i = 0; i < I.length; i += CORNER_BLOCK) m = Math.max(m, largestBlock(I, i, Math.min(I.length, i + CORNER_BLOCK)))
  return m
}

function largestBlock(I: Uint32Array, from: number, to: number): number {
  let m = 0
  for (let i = from; i < to; i++) if (I[i]! > m) m = I[i]!
  return m
}

/** Vertices per call of `boundsBlock`. */
const BOX_BLOCK = 8192

/**
 * Bounding box [minx, miny, minz, maxx, maxy, maxz] (m) of the finite vertices of P, and how many
 * vertices have a non-finite coordinate (the first few listed in `bad`, numbered from 0).
 */
export function vertexBounds(P: Float64Array, bad: number[] = []): { box: Float64Array, nonFinite: number } {
  const box = Float64Array.of(Infinity, Infinity, Infinity, -Infinity, -Infinity, -Infinity)
  const nv = P.length / 3
  let nonFinite = 0
  for (let v = 0; v < nv; v += BOX_BLOCK) nonFinite += boundsBlock(P, v, Math.min(nv, v + BOX_BLOCK), box, bad)
  return { box, nonFinite }
}

/**
 * Widens box [minx, miny, minz, maxx, maxy, maxz] (m) by the finite vertices from..to−1; returns
 * how many have a non-finite coordinate and lists the first few in `bad`. Called per block so that
 * V8 compiles it with unboxed float64 values before the bulk of the work.
 */
function boundsBlock(P: Float64Array, from: number, to: number, box: Float64Array, bad: number[]): number {
  let minx = box[0]!, miny = box[1]!, minz = box[2]!, maxx = box[3]!, maxy = box[4]!, maxz = box[5]!
  let nBad = 0
  for (let v = from; v < to; v++) {
    const x = P[3 * v]!, y = P[3 * v + 1]!, z = P[3 * v + 2]!
    if (!(x - x + (y - y) + (z - z) === 0)) { // NaN exactly when a coordinate is NaN or ±Infinity
      nBad++
      if (bad.length < MAX_LISTED) bad.push(v)
      continue
    }
    if (x < minx) minx = x; if (x > maxx) maxx = x
    if (y < miny) miny = y; if (y > maxy) maxy = y
    if (z < minz) minz = z; if (z > maxz) maxz = z
  }
  box[0] = minx; box[1] = miny; box[2] = minz; box[3] = maxx; box[4] = maxy; box[5] = maxz
  return nBad
}
