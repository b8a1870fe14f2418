/**
 * Cut a whole bilobed body at its neck into two closed lobes.
 *
 * Neck: the deepest interior minimum of the section area (planes ⊥ the long principal axis)
 * between the two largest area maxima, refined by golden-section search. A user-given plane
 * overrides the search. The cut uses manifold-3d `splitByPlane`, so both lobes are closed.
 */
import type { TriMesh, Vec3 } from '../types'
import { GeometryError } from '../types'
import { massProperties } from '../mass/mass'
import { add, dot, normalize, scale } from '../math/linalg'
import { splitMeshByPlane } from '../merge/booleans'
import { sectionByPlane } from './section'

export interface SplitResult {
  /** Lobe on the +normal side and on the −normal side, closed, same frame as the input, m. */
  positive: TriMesh
  negative: TriMesh
  positiveVolume: number
  negativeVolume: number
  /** Cut plane (input frame): point and unit normal (the long axis unless given). */
  plane: { point: Vec3, normal: Vec3 }
  /** Section area at the cut, m², and the scanned profile (position along the normal from the centroid, m; area, m²). */
  neckArea: number
  profile: { position: number, area: number }[]
}

function totalArea(mesh: TriMesh, point: Vec3, n: Vec3): number {
  let a = 0
  for (const l of sectionByPlane(mesh, point, n)) a += l.signedArea
  return a
}

/**
 * Split `mesh` at its neck (or at `plane`).
 * @throws GeometryError('no-neck') when the area profile along the long axis has no interior
 *   minimum between two maxima (not bilobed); manifold/mesh errors from the cut.
 */
export async function splitAtNeck(mesh: TriMesh, opts: { plane?: { point: Vec3, normal: Vec3 }, scanSteps?: number } = {}): Promise<SplitResult> {
  const profile: { position: number, area: number }[] = []
  let point: Vec3, normal: Vec3, neckArea: number
  if (opts.plane) {
    point = opts.plane.point
    normal = normalize(opts.plane.normal, 'splitAtNeck: plane normal')
    neckArea = totalArea(mesh, point, normal)
  }
  else {
    const props = massProperties(mesh, { density: 1 })
    const c = props.centroid
    normal = props.principalAxes[0]
    let lo = Infinity, hi = -Infinity
    const Pp = mesh.positions
    for (let i = 0; i < Pp.length; i += 3) {
      const s = (Pp[i] - c[0]) * normal[0] + (Pp[i + 1] - c[1]) * normal[1] + (Pp[i + 2] - c[2]) * normal[2]
      if (s < lo) lo = s
      if (s > hi) hi = s
    }
    const N = opts.scanSteps ?? 81
    const at = (s: number) => totalArea(mesh, add(c, scale(normal, s)), normal)
    for (let i = 1; i < N - 1; i++) {
      const s = lo + (hi - lo) * i / (N - 1)
      profile.push({ position: s, area: at(s) })
    }
    const A = profile.map(p => p.area)
    const maxima: number[] = []
    for (let i = 1; i < A.length - 1; i++) if (A[i] >= A[i - 1] && A[i] > A[i + 1]) maxima.push(i)
    if (maxima.length < 2) throw new GeometryError('no-neck', 'splitAtNeck: the section area along the long axis has fewer than two maxima (the body does not look bilobed); give a plane')
    maxima.sort((i, j) => A[j] - A[i])
    const [m1, m2] = [Math.min(maxima[0], maxima[1]), Math.max(maxima[0], maxima[1])]
    let iMin = m1
    for (let i = m1; i <= m2; i++) if (A[i] < A[iMin]) iMin = i
    if (iMin === m1 || iMin === m2) throw new GeometryError('no-neck', 'splitAtNeck: no interior area minimum between the two maxima')
    let a = profile[iMin - 1].position, b = profile[iMin + 1].position
    const gr = (Math.sqrt(5) - 1) / 2
    let x1 = b - gr * (b - a), x2 = a + gr * (b - a)
    let f1 = at(x1), f2 = at(x2)
    for (let it = 0; it < 30; it++) {
      if (f1 < f2) { b = x2; x2 = x1; f2 = f1; x1 = b - gr * (b - a); f1 = at(x1) }
      else { a = x1; x1 = x2; f1 = f2; x2 = a + gr * (b - a); f2 = at(x2) }
    }
    const s = (a + b) / 2
    point = add(c, scale(normal, s))
    neckArea = at(s)
  }
  const parts = await splitMeshByPlane(mesh, normal, dot(point, normal))
  return { ...parts, plane: { point, normal }, neckArea, profile }
}
