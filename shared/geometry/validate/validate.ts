/**
 * Mesh validation and repair for mass properties and gravity.
 *
 * What `validateMesh` guarantees on return: finite coordinates; every index in range; duplicate
 * vertices welded (tolerance relative to the bounding-box diagonal); unreferenced vertices and
 * degenerate (zero-area) faces removed; every edge shared by exactly two faces in opposite
 * directions (closed, consistently oriented 2-manifold); every vertex fan a single disk; every
 * connected component with positive signed volume (outward normals, CCW seen from outside).
 * All edge work is on typed arrays (vertex-sorted half-edge lists), no per-edge objects.
 */
import type { TriMesh } from '../types'
import { FILE_FACE_NUMBERING, GeometryError, MAX_LISTED } from '../types'
import { largest, vertexBounds } from '../mesh/bounds'
import { faceComponents } from '../mesh/components'
import type { EdgeAnalysis } from '../mesh/edges'
import { analyseEdges, closedOrientedManifold } from '../mesh/edges'
import { applyFlips, componentVolumes, countLabels, nonManifoldVertices, orientComponents, reflectTwins, reverseInverted } from './orient'
import type { ValidateOptions, ValidatedMesh, ValidationReport, ValidationWarning } from './report'
import { issuesFor } from './report'
import { findSelfIntersections } from './self-intersections'
import { remapFaces, renumberUsed, weld } from './weld'

/**
 * Check and repair a triangle mesh. Returns a new mesh (the input is not modified) and a report.
 * @throws GeometryError 'empty-mesh', 'non-finite', 'index-out-of-range', 'degenerate-face',
 *   'open-mesh', 'non-manifold-edge', 'non-orientable', 'non-manifold-vertex'. The message gives
 *   counts and the first few faces or vertices; `issues` lists them as { path: 'faces[17]', message }.
 *   Faces are named by the file's own numbering (`mesh.sourceFace`, from 0) when the mesh came
 *   from a reader, else by input triangle index (from 0); vertices by input index (from 0).
 */
export function validateMesh(mesh: TriMesh, opts: ValidateOptions = {}): ValidatedMesh {
  const P0 = mesh.positions
  const I0 = mesh.indices
  if (P0.length % 3 !== 0 || I0.length % 3 !== 0) throw new GeometryError('bad-mesh', 'validateMesh: positions and indices lengths must be multiples of 3')
  const nv0 = P0.length / 3
  const nf0 = I0.length / 3
  if (nv0 === 0 || nf0 === 0) throw new GeometryError('empty-mesh', 'validateMesh: the mesh has no vertices or no faces')
  const warnings: ValidationWarning[] = []
  // Name faces as the file numbers them: a polygon split into triangles is still one face.
  const src = mesh.sourceFace && mesh.sourceFace.length === nf0 ? mesh.sourceFace : undefined
  const faceList = (tris: number[]): number[] => {
    const out: number[] = []
    for (const t of tris) { const f = src ? src[t]! : t; if (!out.includes(f)) out.push(f) }
    return out
  }
  const FACES = src ? 'faces' : 'triangles'
  const numbering = src ? ` (${FILE_FACE_NUMBERING})` : ' (triangles numbered from 0)'

  // 1. finite coordinates, bounding box
  const badV: number[] = []
  const { box, nonFinite: nBadV } = vertexBounds(P0, badV)
  const minx = box[0]!, miny = box[1]!, minz = box[2]!, maxx = box[3]!, maxy = box[4]!, maxz = box[5]!
  if (nBadV > 0) throw new GeometryError('non-finite', `validateMesh: ${nBadV} vertices have non-finite coordinates; first: ${badV.join(', ')} (vertices numbered from 0 in file order)`, issuesFor(badV, 'non-finite coordinate', 'vertices'))

  // 2. indices in range
  {
    let n = 0
    const first: number[] = []
    // one cheap pass for the largest index; the detailed pass only when something is out of range
    if (largest(I0) >= nv0) {
      for (let i = 0; i < I0.length; i++) {
        if (I0[i]! >= nv0) { n++; const f = (i / 3) | 0; if (first.length < MAX_LISTED && first[first.length - 1] !== f) first.push(f) }
      }
    }
    const ff = faceList(first)
    if (n > 0) throw new GeometryError('index-out-of-range', `validateMesh: ${n} vertex indices out of range (vertex count ${nv0}); first ${FACES}: ${ff.join(', ')}${numbering}`, issuesFor(ff, 'vertex index out of range'))
  }

  // 3. weld within tolerance (spatial hash, cells of 8·tol, neighbour cells checked near a boundary).
  // 'auto' (default): only when the mesh as given has boundary edges, i.e. seams of duplicated
  // vertices; welding a closed mesh could only join separate sheets that touch.
  const diag = Math.hypot(maxx - minx, maxy - miny, maxz - minz)
  const relTol = opts.weldTolerance ?? 1e-9
  const tol = relTol * diag
  const weldMode = opts.weld ?? 'auto'
  let doWeld = weldMode === 'always'
  // the usual input: closed, consistently wound, manifold at every edge and vertex (no weld then)
  const clean = weldMode !== 'always' && closedOrientedManifold(I0, nv0)
  let E0: EdgeAnalysis | undefined
  if (weldMode === 'auto' && !clean) { E0 = analyseEdges(I0, nv0, true); doWeld = E0.boundary > 0 }
  // without a weld, vertex numbers stay as they are (weldMap and reps null: the identity)
  const welded = doWeld ? weld(P0, nv0, minx, miny, minz, diag, tol) : null
  const weldMap = welded ? welded.map : null, reps = welded ? welded.reps : null
  const nvWeld = welded ? welded.count : nv0
  const weldedVertices = nv0 - nvWeld

  // 4. remap faces, drop collapsed and zero-area triangles
  const degFaces: number[] = []
  const center = new Float64Array([(minx + maxx) / 2, (miny + maxy) / 2, (minz + maxz) / 2])
  const remapped = remapFaces(P0, I0, weldMap, reps, nvWeld, center, degFaces)
  const I = remapped.I, faceOrigin = remapped.faceOrigin
  const nf = remapped.nf
  const degenerate = nf0 - nf
  if (nf === 0) throw new GeometryError('degenerate-face', `validateMesh: all ${nf0} triangles are degenerate (zero area)`, issuesFor(faceList(degFaces), 'zero-area face'))

  // 5. drop unreferenced vertices, build compact positions
  const corners = remapped.corners
  const { used, count: nv } = renumberUsed(I, corners)
  let P: Float64Array
  if (!doWeld && nv === nvWeld) P = P0.slice() // nothing welded or dropped: a plain copy
  else {
    P = new Float64Array(nv * 3)
    for (let v = 0; v < nvWeld; v++) {
      const u = used ? used[v]! : v
      if (u >= 0) { const r = 3 * (reps ? reps[v]! : v); P[3 * u] = P0[r]!; P[3 * u + 1] = P0[r + 1]!; P[3 * u + 2] = P0[r + 2]! }
    }
  }
  const unreferenced = nvWeld - nv
  if (weldedVertices > 0) warnings.push({ code: 'welded-vertices', message: `${weldedVertices} duplicate vertices welded (tolerance ${tol.toExponential(3)} m)` })
  if (unreferenced > 0) warnings.push({ code: 'unreferenced-vertices', message: `${unreferenced} vertices used by no face were removed` })

  // 6. edges
  // the first check or analysis still holds when nothing was welded, dropped or renumbered; a
  // mesh found clean needs none (E null)
  const unchanged = !doWeld && nf === nf0 && nv === nv0
  const E = clean && unchanged ? null : E0 && unchanged ? E0 : analyseEdges(I, nv)
  if (E && (E.boundary > 0 || E.nonManifold > 0)) {
    if (E.nonManifold > 0) {
      const f = faceList(E.nonManifoldFaces.map(x => faceOrigin[x]!))
      throw new GeometryError('non-manifold-edge', `validateMesh: ${E.nonManifold} edges are shared by more than two faces; first ${FACES}: ${f.join(', ')}${numbering}`, issuesFor(f, 'edge shared by more than two faces'))
    }
    const f = faceList(E.boundaryFaces.map(x => faceOrigin[x]!))
    if (degenerate > 0) {
      // was it closed before the degenerate faces were dropped?
      const withDeg = new Uint32Array(nf0 * 3)
      for (let i = 0; i < I0.length; i++) withDeg[i] = weldMap ? weldMap[I0[i]!]! : I0[i]!
      const E2 = analyseEdges(withDeg, nvWeld, true)
      if (E2.boundary === 0) {
        const d = faceList(degFaces)
        throw new GeometryError('degenerate-face', `validateMesh: ${degenerate} zero-area triangles cannot be dropped without opening the mesh (${E.boundary} boundary edges would remain); first ${FACES} with them: ${d.join(', ')}${numbering}`, issuesFor(d, 'zero-area face'))
      }
    }
    throw new GeometryError('open-mesh', `validateMesh: the mesh is open: ${E.boundary} boundary edges (edges used by one face only); first ${FACES}: ${f.join(', ')}${numbering}`, issuesFor(f, 'face with a boundary edge'))
  }
  if (degenerate > 0) warnings.push({ code: 'degenerate-faces', message: `${degenerate} zero-area triangles were dropped; first ${FACES} with them: ${faceList(degFaces).join(', ')}${numbering}` })

  // 7–8. orientation, components, vertex fans
  const checkFans = (twin: Int32Array) => {
    const { bad, first } = nonManifoldVertices(I, corners, twin)
    const f = faceList(first.map(x => faceOrigin[x]!))
    if (bad > 0) throw new GeometryError('non-manifold-vertex', `validateMesh: ${bad} vertices are non-manifold (their faces form more than one fan, e.g. two bodies touching at a point); first ${FACES} at such vertices: ${f.join(', ')}${numbering}`, issuesFor(f, 'face at a non-manifold vertex'))
  }
  let comp: Uint32Array, compSizes: number[], flippedFaces = 0
  if (!E || E.sameDirEdges === 0) {
    // Winding already consistent: nothing to flip and nothing non-orientable, so the fan check
    // can come first. Once every fan is a single disk, faces sharing a vertex are also joined
    // through edges, and a union-find on vertices gives the components the search would give.
    if (E) checkFans(E.twin)
    const fc = faceComponents({ positions: P, indices: I })
    comp = fc.label
    compSizes = fc.count === 1 ? [nf] : countLabels(comp, fc.count)
  } else {
    // search over faces through edges: flips relative to each component's first face
    const o = orientComponents(nf, E.twin, E.sameDir)
    comp = o.comp
    compSizes = o.compSizes
    const badOrient = o.badFaces.map(g => faceOrigin[g]!)
    if (badOrient.length > 0) {
      const f = faceList(badOrient)
      throw new GeometryError('non-orientable', `validateMesh: the surface is not orientable (no consistent winding exists, e.g. a Möbius band); ${FACES} involved include: ${f.join(', ')}${numbering}`, issuesFor(f, 'inconsistent winding that cannot be fixed'))
    }
    // keep the majority winding of each component
    const invertBfs = Uint8Array.from(o.compFlips, (fl, c) => (fl * 2 > compSizes[c]! ? 1 : 0))
    flippedFaces = applyFlips(I, o.flip, comp, invertBfs)
    if (flippedFaces > 0) {
      warnings.push({ code: 'inconsistent-winding', message: `${flippedFaces} faces had a winding opposite to their neighbours and were reversed` })
      reflectTwins(E.twin, o.flip)
    }
    checkFans(E.twin)
  }
  const nComp = compSizes.length

  // 9. signed volume per component; reverse inside-out components
  // one component, nothing flipped: the sum taken during the remap, same terms in the same order
  const vol = nComp === 1 && flippedFaces === 0
    ? Float64Array.of(remapped.volSum)
    : componentVolumes(P, I, comp, nComp, center[0]!, center[1]!, center[2]!)
  let invertedComponents = 0
  let volume = 0
  for (let c = 0; c < nComp; c++) { if (vol[c]! < 0) invertedComponents++; volume += Math.abs(vol[c]!) / 6 }
  if (invertedComponents > 0) {
    reverseInverted(I, comp, vol)
    warnings.push({ code: 'inverted-orientation', message: `${invertedComponents} of ${nComp} components were inside-out (negative volume) and were reversed` })
  }
  const componentFaceCounts = compSizes.slice().sort((a, b) => b - a)
  if (nComp > 1) warnings.push({ code: 'multiple-components', message: `the mesh has ${nComp} separate components (faces per component: ${componentFaceCounts.slice(0, 10).join(', ')}${nComp > 10 ? ', ...' : ''}); each is oriented as its own closed surface, and the mass properties are those of all of them together (one rigid body); values per component are listed` })

  // 10. self-intersections (three-mesh-bvh), where affordable
  const maxSI = opts.selfIntersectionMaxFaces ?? 300_000
  let selfIntersections: ValidationReport['selfIntersections'] = { checked: false, count: 0, firstPairs: [] }
  if (nf <= maxSI) {
    selfIntersections = findSelfIntersections({ positions: P, indices: I })
    selfIntersections.firstPairs = selfIntersections.firstPairs.map(([a, b]) => {
      const fa = faceOrigin[a]!, fb = faceOrigin[b]!
      return src ? [src[fa]!, src[fb]!] : [fa, fb]
    })
    if (selfIntersections.count > 0) warnings.push({ code: 'self-intersections', message: `${selfIntersections.count} pairs of non-adjacent triangles intersect (first pairs of ${FACES}: ${selfIntersections.firstPairs.slice(0, 3).map(p => p.join('–')).join(', ')}${numbering}); volume and gravity are unreliable` })
  } else {
    warnings.push({ code: 'self-intersection-not-checked', message: `self-intersections were not checked (${nf} faces > ${maxSI})` })
  }

  const report: ValidationReport = {
    warnings,
    vertexCount: nv,
    faceCount: nf,
    inputVertexCount: nv0,
    inputFaceCount: nf0,
    weldedVertices,
    weldToleranceMetres: tol,
    unreferencedVertices: unreferenced,
    degenerateFaces: degenerate,
    flippedFaces,
    invertedOrientation: invertedComponents > 0,
    invertedComponents,
    components: nComp,
    componentFaceCounts,
    volume,
    selfIntersections,
    faceOrigin,
  }
  return { mesh: { positions: P, indices: I }, report, componentLabels: comp }
}
