/**
 * The core's one seeded pseudo-random generator, for reproducible sampling (spread studies,
 * generated demo meshes, randomised tests).
 * Generator: sfc32 (Chris Doty-Humphrey's "small fast counting" generator, public domain), seeded
 * through splitmix32 so that the stream of sample `i` depends only on (seed, i): samples can be run
 * in any order and on any worker and still reproduce.
 */

/** splitmix32 step: a well-mixed 32-bit hash of the input. */
function splitmix32(x: number): number {
  x = (x + 0x9E3779B9) | 0
  let z = x
  z = Math.imul(z ^ (z >>> 16), 0x85EBCA6B)
  z = Math.imul(z ^ (z >>> 13), 0xC2B2AE35)
  return (z ^ (z >>> 16)) >>> 0
}

export interface Rng {
  /** Uniform in [0, 1). */
  next(): number
  /** Uniform in [lo, hi). */
  uniform(lo: number, hi: number): number
  /** Standard normal (Box–Muller). */
  normal(mean?: number, std?: number): number
}

/** A seeded generator. `stream` selects an independent sub-stream (e.g. the sample index). */
export function createRng(seed: number, stream = 0): Rng {
  let a = splitmix32(seed >>> 0)
  let b = splitmix32(a ^ (stream >>> 0))
  let c = splitmix32(b ^ 0x6A09E667)
  let d = 1
  const raw = () => {
    const t = (((a + b) | 0) + d) | 0
    d = (d + 1) | 0
    a = b ^ (b >>> 9)
    b = (c + (c << 3)) | 0
    c = (c << 21) | (c >>> 11)
    c = (c + t) | 0
    return (t >>> 0) / 4294967296
  }
  for (let i = 0; i < 12; i++) raw()
  let spare: number | null = null
  return {
    next: raw,
    uniform: (lo, hi) => lo + (hi - lo) * raw(),
    normal(mean = 0, std = 1) {
      if (spare !== null) {
        const s = spare
        spare = null
        return mean + std * s
      }
      let u = 0
      while (u === 0) u = raw()
      const v = raw()
      const r = Math.sqrt(-2 * Math.log(u))
      spare = r * Math.sin(2 * Math.PI * v)
      return mean + std * r * Math.cos(2 * Math.PI * v)
    },
  }
}

/**
 * Uniform numbers in [0, 1) from stream 0 of `createRng(seed)`: the same generator, for callers that
 * need only uniform draws (mesh generators, randomised tests).
 */
export function seededRandom(seed: number): () => number {
  return createRng(seed).next
}
