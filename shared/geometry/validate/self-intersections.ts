/**
 * Self-intersection check of a triangle mesh (three-mesh-bvh, float32).
 */
import type { TriMesh } from '../types'
import { ExtendedTriangle, Matrix4, buildMeshBvh, disposeMeshBvh } from '../adapters/three'

/**
 * Pairs of faces that intersect and share no vertex, using a three-mesh-bvh BVH built on a
 * Float32 copy (`indirect: true`, so the index order is kept) cast against itself. Pairs that
 * share a vertex are not tested. Triangle tests use three-mesh-bvh's ExtendedTriangle (float32).
 */
export function findSelfIntersections(mesh: TriMesh, maxPairs = 10): { checked: true, count: number, firstPairs: [number, number][] } {
  const bvh = buildMeshBvh(Float32Array.from(mesh.positions), mesh.indices.slice(), { indirect: true, targetLeafSize: 8 })
  const I = mesh.indices
  const P = mesh.positions
  const t1 = new ExtendedTriangle(), t2 = new ExtendedTriangle()
  const setTri = (t: ExtendedTriangle, f: number) => {
    const a = 3 * I[3 * f]!, b = 3 * I[3 * f + 1]!, c = 3 * I[3 * f + 2]!
    t.a.set(P[a]!, P[a + 1]!, P[a + 2]!); t.b.set(P[b]!, P[b + 1]!, P[b + 2]!); t.c.set(P[c]!, P[c + 1]!, P[c + 2]!)
    t.needsUpdate = true
  }
  let count = 0
  const firstPairs: [number, number][] = []
  const resolve = (i: number) => bvh.resolveTriangleIndex(i)
  bvh.bvhcast(bvh, new Matrix4(), {
    intersectsRanges(o1: number, c1: number, o2: number, c2: number) {
      for (let i = o1; i < o1 + c1; i++) {
        const f = resolve(i)
        const fa = I[3 * f]!, fb = I[3 * f + 1]!, fc = I[3 * f + 2]!
        let setF = false
        for (let j = o2; j < o2 + c2; j++) {
          const g = resolve(j)
          if (g <= f) continue
          const ga = I[3 * g]!, gb = I[3 * g + 1]!, gc = I[3 * g + 2]!
          if (ga === fa || ga === fb || ga === fc || gb === fa || gb === fb || gb === fc || gc === fa || gc === fb || gc === fc) continue
          if (!setF) { setTri(t1, f); setF = true }
          setTri(t2, g)
          if ((t1.intersectsTriangle as unknown as (o: ExtendedTriangle, t: null, quiet: boolean) => boolean).call(t1, t2, null, true)) {
            count++
            if (firstPairs.length < maxPairs) firstPairs.push([f, g])
          }
        }
      }
      return false
    },
  })
  disposeMeshBvh(bvh)
  return { checked: true, count, firstPairs }
}
