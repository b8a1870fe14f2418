/**
 * Ties each face of a display copy (a simplified mesh for drawing) to the face of the analysis
 * mesh nearest its centroid, so the display can be coloured with the full per-face field
 * (three-mesh-bvh `closestPointToPoint`, float32 relative to the analysis mesh's first vertex).
 */
import { Vector3, buildMeshBvh, disposeMeshBvh, float32Relative } from '../adapters/three'
import type { TriMesh, Vec3 } from '../types'

/**
 * For every face of the display mesh (positions relative to `displayOrigin`, metres, file frame),
 * the index of the nearest analysis-mesh face (Uint32Array, one per display face).
 */
export function nearestAnalysisFaces(analysis: TriMesh, displayPositions: Float32Array, displayIndices: Uint32Array, displayOrigin: Vec3): Uint32Array {
  const P = analysis.positions
  const o0 = P[0]!, o1 = P[1]!, o2 = P[2]!
  const bvh = buildMeshBvh(float32Relative(P), analysis.indices, { indirect: true })
  try {
    const nf = displayIndices.length / 3
    const out = new Uint32Array(nf)
    const q = new Vector3()
    const hit = { point: new Vector3(), distance: 0, faceIndex: 0 }
    const D = displayPositions, I = displayIndices
    for (let f = 0; f < nf; f++) {
      const a = 3 * I[3 * f]!, b = 3 * I[3 * f + 1]!, c = 3 * I[3 * f + 2]!
      q.set(
        (D[a]! + D[b]! + D[c]!) / 3 + displayOrigin[0] - o0,
        (D[a + 1]! + D[b + 1]! + D[c + 1]!) / 3 + displayOrigin[1] - o1,
        (D[a + 2]! + D[b + 2]! + D[c + 2]!) / 3 + displayOrigin[2] - o2,
      )
      out[f] = bvh.closestPointToPoint(q, hit) ? hit.faceIndex : 0
    }
    return out
  }
  finally {
    disposeMeshBvh(bvh)
  }
}
