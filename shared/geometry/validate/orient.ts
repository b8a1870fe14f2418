/**
 * Orientation of `validateMesh`: consistent winding per connected component (search through
 * paired edges), signed volumes, inside-out components, vertex fans.
 */
import { MAX_LISTED } from '../types'
import type { VertexCorners } from './weld'
import { addTriple } from './weld'

/**
 * Breadth-first search over faces through paired edges, seeded at the lowest unvisited face.
 * flip[f] (0/1) is f's winding relative to its component's seed: a neighbour across a
 * same-direction edge gets the opposite flip. comp[f] labels components in order of first face.
 * badFaces: the first few faces reached with a contradictory flip (the surface is not orientable).
 */
export function orientComponents(nf: number, twin: Int32Array, sameDir: Uint8Array) {
  const flip = new Int8Array(nf).fill(-1)
  const comp = new Uint32Array(nf)
  const queue = new Uint32Array(nf)
  const compSizes: number[] = []
  const compFlips: number[] = []
  const badFaces: number[] = []
  for (let s = 0; s < nf; s++) {
    if (flip[s] !== -1) continue
    const nComp = compSizes.length
    let head = 0, tail = 0
    queue[tail++] = s
    flip[s] = 0
    comp[s] = nComp
    let flips = 0
    while (head < tail) {
      const f = queue[head++]!
      const ff = flip[f]!
      flips += ff
      for (let h = 3 * f; h < 3 * f + 3; h++) {
        const g = (twin[h]! / 3) | 0
        const want = sameDir[h] ? 1 - ff : ff
        if (flip[g] === -1) { flip[g] = want; comp[g] = nComp; queue[tail++] = g } else if (flip[g] !== want && badFaces.length < MAX_LISTED) badFaces.push(g)
      }
    }
    compSizes.push(tail)
    compFlips.push(flips)
  }
  return { flip, comp, compSizes, compFlips, badFaces }
}

/**
 * Final winding per face: the BFS flip, inverted for components where most faces were flipped
 * (the majority winding is kept). Reverses those faces in I (corners 1 and 2), leaves the final
 * flip in `flip` and returns how many faces were reversed.
 */
export function applyFlips(I: Uint32Array, flip: Int8Array, comp: Uint32Array, invert: Uint8Array): number {
  let flipped = 0
  for (let f = 0; f < flip.length; f++) {
    const fl = invert[comp[f]!] ? 1 - flip[f]! : flip[f]!
    flip[f] = fl
    if (fl) { flipped++; const t = I[3 * f + 1]!; I[3 * f + 1] = I[3 * f + 2]!; I[3 * f + 2] = t }
  }
  return flipped
}

/**
 * Six times the signed volume of each component, m³: sum over its faces of the triple product of
 * the corners taken from (cx, cy, cz) (divergence theorem; common practice, no source).
 */
export function componentVolumes(P: Float64Array, I: Uint32Array, comp: Uint32Array, nComp: number, cx: number, cy: number, cz: number): Float64Array {
  const vol = new Float64Array(nComp)
  for (let f = 0; f < comp.length; f++) {
    vol[comp[f]!] = addTriple(vol[comp[f]!]!, P, 3 * I[3 * f]!, 3 * I[3 * f + 1]!, 3 * I[3 * f + 2]!, cx, cy, cz)
  }
  return vol
}

/** Number of faces per component label 0 .. n−1. */
export function countLabels(label: Uint32Array, n: number): number[] {
  const sizes = new Array<number>(n).fill(0)
  for (let f = 0; f < label.length; f++) sizes[label[f]!]!++
  return sizes
}

/** Reverses (corners 1 and 2) every face of a component with negative volume. */
export function reverseInverted(I: Uint32Array, comp: Uint32Array, vol: Float64Array): void {
  for (let f = 0; f < comp.length; f++) {
    if (vol[comp[f]!]! < 0) { const t = I[3 * f + 1]!; I[3 * f + 1] = I[3 * f + 2]!; I[3 * f + 2] = t }
  }
}

/**
 * Follows face flips (corners 1 and 2 swapped where flip[f] = 1) in the half-edge twin table, in
 * place: in a flipped face the edge of half-edge k moves to slot 2 − k (0 ↔ 2, 1 stays). Same
 * result as pairing the flipped faces' edges again, without a new pairing.
 */
export function reflectTwins(twin: Int32Array, flip: Int8Array): void {
  const slot = (h: number) => { const f = (h / 3) | 0; return flip[f] ? 3 * f + 2 - (h - 3 * f) : h }
  for (let f = 0; f < flip.length; f++) {
    const h = 3 * f
    const t0 = slot(twin[h]!), t1 = slot(twin[h + 1]!), t2 = slot(twin[h + 2]!)
    if (flip[f]) { twin[h] = t2; twin[h + 1] = t1; twin[h + 2] = t0 } else { twin[h] = t0; twin[h + 1] = t1; twin[h + 2] = t2 }
  }
}

/**
 * Vertices whose faces form more than one fan, on a closed, consistently wound mesh (twin has no
 * −1). Algorithm: from the vertex's corner in its first face, turn around the vertex (previous
 * half-edge of the face, then its twin) until back at the start; a single disk visits every
 * corner of the vertex. Returns the count and the first faces of the first few such vertices, in
 * vertex order.
 */
export function nonManifoldVertices(I: Uint32Array, corners: VertexCorners, twin: Int32Array): { bad: number, first: number[] } {
  const { count: deg, firstFace } = corners
  let bad = 0
  const first: number[] = []
  for (let v = 0; v < deg.length; v++) {
    const f = firstFace[v]!
    const h0 = I[3 * f] === v ? 3 * f : I[3 * f + 1] === v ? 3 * f + 1 : 3 * f + 2 // half-edge leaving v
    const n = deg[v]!
    let g = h0, steps = 0
    do {
      const p = g % 3 === 0 ? g + 2 : g - 1 // half-edge into v in the same face
      g = twin[p]!
      steps++
    } while (g !== h0 && steps <= n)
    if (steps !== n) { bad++; if (first.length < MAX_LISTED) first.push(f) }
  }
  return { bad, first }
}
