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
import { MeshBVH, ExtendedTriangle } from 'three-mesh-bvh'
import { BufferAttribute, BufferGeometry, Matrix4 } from 'three'
import { FILE_FACE_NUMBERING, GeometryError } from './types'
import type { TriMesh } from './types'

export interface ValidationWarning { code: string, message: string }

export interface ValidationReport {
  warnings: ValidationWarning[]
  /** Vertices and triangles of the returned mesh. */
  vertexCount: number
  faceCount: number
  inputVertexCount: number
  inputFaceCount: number
  /** Vertices merged into another within the weld tolerance. */
  weldedVertices: number
  /** Weld tolerance used, metres (weldTolerance × bounding-box diagonal). */
  weldToleranceMetres: number
  unreferencedVertices: number
  /** Zero-area triangles (collapsed after welding or collinear) that were dropped. */
  degenerateFaces: number
  /** Triangles whose winding was reversed to agree with their neighbours. */
  flippedFaces: number
  /** True when at least one component was inside-out (negative volume) and was reversed. */
  invertedOrientation: boolean
  invertedComponents: number
  /** Connected components (faces joined through shared edges), largest first. */
  components: number
  componentFaceCounts: number[]
  /** Signed volume after repair, m³ (positive). */
  volume: number
  /** firstPairs: face numbers in the file when the input carries `sourceFace`, else triangle indices. */
  selfIntersections: { checked: boolean, count: number, firstPairs: [number, number][] }
  /** For each output triangle, the index of the input triangle it came from. */
  faceOrigin: Uint32Array
}

/** What `validateMesh` returns. */
export interface ValidatedMesh {
  mesh: TriMesh
  report: ValidationReport
  /**
   * Component of each returned triangle (0 .. components − 1, numbered in order of first
   * triangle): the same labels `faceComponents(mesh)` gives for the returned mesh, so callers
   * can skip recomputing them.
   */
  componentLabels: Uint32Array
}

export interface ValidateOptions {
  /** Weld distance as a fraction of the bounding-box diagonal (default 1e-9; 0 welds exact duplicates only). */
  weldTolerance?: number
  /**
   * 'auto' (default): weld only when the input has boundary edges; 'always'; 'never'.
   */
  weld?: 'auto' | 'always' | 'never'
  /** Run the self-intersection check only up to this many faces (default 300 000). */
  selfIntersectionMaxFaces?: number
}

const MAX_LISTED = 5

function issuesFor(faces: ArrayLike<number>, msg: string, kind = 'faces'): { path: string, message: string }[] {
  return Array.from(faces).slice(0, MAX_LISTED).map(f => ({ path: `${kind}[${f}]`, message: msg }))
}

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

/** Largest entry of I (0 when empty); a small function so that it is optimised on its own. */
function largest(I: Uint32Array): number {
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

/**
 * Renumber the vertices that some face uses, keeping their order, and rewrite I in place.
 * Returns used (old → new index, −1 when unused; null when all are used: the identity) and the
 * number of used vertices.
 */
function renumberUsed(I: Uint32Array, corners: VertexCorners): { used: Int32Array | null, count: number } {
  const { count: deg, firstFace } = corners
  const nv = deg.length
  let count = 0
  for (let v = 0; v < nv; v++) if (deg[v]! > 0) count++
  // renumbering keeps the vertex order, so with no unreferenced vertices it is the identity
  if (count === nv) return { used: null, count }
  const used = new Int32Array(nv)
  count = 0
  for (let v = 0; v < nv; v++) used[v] = deg[v]! > 0 ? count++ : -1
  for (let i = 0; i < I.length; i++) I[i] = used[I[i]!]!
  // the per-vertex tables follow the new numbering
  for (let v = 0; v < nv; v++) if (used[v]! >= 0) { deg[used[v]!] = deg[v]!; firstFace[used[v]!] = firstFace[v]! }
  corners.count = deg.subarray(0, count)
  corners.firstFace = firstFace.subarray(0, count)
  return { used, count }
}

interface VertexCorners {
  /** Face corners at each vertex (0: unreferenced). */
  count: Uint32Array
  /** First face that uses each vertex (meaningless where count is 0). */
  firstFace: Int32Array
}

/**
 * Weld vertices closer than `tol` (m): spatial hash with cells of max(8·tol, 1e-9·diag); a vertex
 * is compared with the representatives in its cell and, when it lies within tol of a cell face,
 * the neighbouring cells. Returns map (old → new index), count, reps (new → old representative).
 */
function weld(P: Float64Array, nv: number, minx: number, miny: number, minz: number, diag: number, tol: number) {
  const map = new Uint32Array(nv)
  const reps = new Uint32Array(nv)
  const C = Math.max(8 * tol, 1e-9 * diag) || 1
  let cap = 1
  while (cap < 2 * nv) cap <<= 1
  const mask = cap - 1
  const kx = new Int32Array(cap), ky = new Int32Array(cap), kz = new Int32Array(cap)
  const head = new Int32Array(cap).fill(-1)
  const next = new Int32Array(nv) // chain of representatives per cell (new indices)
  const tol2 = tol * tol
  const r = tol / C
  let count = 0
  const find = (ix: number, iy: number, iz: number): number => {
    let h = (Math.imul(ix, 73856093) ^ Math.imul(iy, 19349663) ^ Math.imul(iz, 83492791)) & mask
    for (;;) {
      if (head[h] === -1 || (kx[h] === ix && ky[h] === iy && kz[h] === iz)) return h
      h = (h + 1) & mask
    }
  }
  for (let v = 0; v < nv; v++) {
    const x = P[3 * v]!, y = P[3 * v + 1]!, z = P[3 * v + 2]!
    const fx = (x - minx) / C, fy = (y - miny) / C, fz = (z - minz) / C
    const ix = Math.floor(fx), iy = Math.floor(fy), iz = Math.floor(fz)
    let found = -1
    const x0 = Math.floor(fx - r), x1 = Math.floor(fx + r)
    const y0 = Math.floor(fy - r), y1 = Math.floor(fy + r)
    const z0 = Math.floor(fz - r), z1 = Math.floor(fz + r)
    search:
    for (let ax = x0; ax <= x1; ax++) {
      for (let ay = y0; ay <= y1; ay++) {
        for (let az = z0; az <= z1; az++) {
          const h = find(ax, ay, az)
          for (let u = head[h]!; u !== -1; u = next[u]!) {
            const q = 3 * reps[u]!
            const dx = P[q]! - x, dy = P[q + 1]! - y, dz = P[q + 2]! - z
            if (dx * dx + dy * dy + dz * dz <= tol2) { found = u; break search }
          }
        }
      }
    }
    if (found >= 0) { map[v] = found; continue }
    const u = count++
    reps[u] = v
    map[v] = u
    const h = find(ix, iy, iz)
    if (head[h] === -1) { kx[h] = ix; ky[h] = iy; kz[h] = iz }
    next[u] = head[h]!
    head[h] = u
  }
  return { map, count, reps }
}

/**
 * Face remap after welding (weldMap null: no weld, indices kept). Drops collapsed triangles and
 * zero-area ones: |u × v|² ≤ 1e-24 · (longest edge)⁴, i.e. sin of the largest angle below 1e-12
 * (common practice, no source). Lists the first few dropped input triangles in `degFaces`.
 * Also counts the kept faces' corners per vertex (nv: vertex count after welding) and sums the
 * kept faces' `addTriple` about center in face order (volSum, m³ × 6), which is the volume sum of
 * `componentVolumes` when nothing is flipped and there is one component.
 */
function remapFaces(P0: Float64Array, I0: Uint32Array, weldMap: Uint32Array | null, reps: Uint32Array | null, nv: number, center: Float64Array, degFaces: number[]) {
  const nf0 = I0.length / 3
  const r: RemapState = {
    P0, I0, weldMap, reps, center, degFaces,
    I: new Uint32Array(I0.length),
    faceOrigin: new Uint32Array(nf0),
    corners: { count: new Uint32Array(nv), firstFace: new Int32Array(nv) },
    nf: 0,
    volSum: 0,
  }
  for (let f = 0; f < nf0; f += FACE_BLOCK) remapBlock(r, f, Math.min(nf0, f + FACE_BLOCK))
  let { I, faceOrigin } = r
  const { nf, corners, volSum } = r
  if (nf < nf0 && nf > 0) { I = I.slice(0, 3 * nf); faceOrigin = faceOrigin.slice(0, nf) }
  return { I, faceOrigin, nf, corners, volSum }
}

/** Faces per call of `remapBlock` (called per block so that V8 optimises it early, as `boundsBlock`). */
const FACE_BLOCK = 16384

interface RemapState {
  P0: Float64Array
  I0: Uint32Array
  weldMap: Uint32Array | null
  reps: Uint32Array | null
  /** Bounding-box centre, m. */
  center: Float64Array
  degFaces: number[]
  I: Uint32Array
  faceOrigin: Uint32Array
  corners: VertexCorners
  /** Faces kept so far. */
  nf: number
  /** Running volume sum (see `remapFaces`), m³ × 6. */
  volSum: number
}

/** Input faces from .. to−1 of `remapFaces`. */
function remapBlock(r: RemapState, from: number, to: number): void {
  const { P0, I0, weldMap, reps, degFaces, I, faceOrigin } = r
  const { count, firstFace } = r.corners
  const cx = r.center[0]!, cy = r.center[1]!, cz = r.center[2]!
  let nf = r.nf, volSum = r.volSum
  for (let f = from; f < to; f++) {
    let a = I0[3 * f]!, b = I0[3 * f + 1]!, c = I0[3 * f + 2]!
    if (weldMap) { a = weldMap[a]!; b = weldMap[b]!; c = weldMap[c]! }
    const ra = reps ? reps[a]! : a, rb = reps ? reps[b]! : b, rc = reps ? reps[c]! : c
    if (a === b || b === c || c === a) { if (degFaces.length < MAX_LISTED) degFaces.push(f); continue }
    // zero area: |u × v|² ≤ 1e-24 · (longest edge)⁴ (u, v: the edges from a)
    const pa = 3 * ra, pb = 3 * rb, pc = 3 * rc
    const ax = P0[pa]!, ay = P0[pa + 1]!, az = P0[pa + 2]!
    const ux = P0[pb]! - ax, uy = P0[pb + 1]! - ay, uz = P0[pb + 2]! - az
    const vx = P0[pc]! - ax, vy = P0[pc + 1]! - ay, vz = P0[pc + 2]! - az
    const wx = vx - ux, wy = vy - uy, wz = vz - uz
    const nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx
    const e2 = Math.max(ux * ux + uy * uy + uz * uz, vx * vx + vy * vy + vz * vz, wx * wx + wy * wy + wz * wz)
    if (nx * nx + ny * ny + nz * nz <= 1e-24 * e2 * e2) { if (degFaces.length < MAX_LISTED) degFaces.push(f); continue }
    volSum = addTriple(volSum, P0, pa, pb, pc, cx, cy, cz)
    I[3 * nf] = a; I[3 * nf + 1] = b; I[3 * nf + 2] = c
    faceOrigin[nf] = f
    if (count[a]!++ === 0) firstFace[a] = nf
    if (count[b]!++ === 0) firstFace[b] = nf
    if (count[c]!++ === 0) firstFace[c] = nf
    nf++
  }
  r.nf = nf
  r.volSum = volSum
}

/**
 * Breadth-first search over faces through paired edges, seeded at the lowest unvisited face.
 * flip[f] (0/1) is f's winding relative to its component's seed: a neighbour across a
 * same-direction edge gets the opposite flip. comp[f] labels components in order of first face.
 * badFaces: the first few faces reached with a contradictory flip (the surface is not orientable).
 */
function orientComponents(nf: number, twin: Int32Array, sameDir: Uint8Array) {
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
function applyFlips(I: Uint32Array, flip: Int8Array, comp: Uint32Array, invert: Uint8Array): number {
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
function componentVolumes(P: Float64Array, I: Uint32Array, comp: Uint32Array, nComp: number, cx: number, cy: number, cz: number): Float64Array {
  const vol = new Float64Array(nComp)
  for (let f = 0; f < comp.length; f++) {
    vol[comp[f]!] = addTriple(vol[comp[f]!]!, P, 3 * I[3 * f]!, 3 * I[3 * f + 1]!, 3 * I[3 * f + 2]!, cx, cy, cz)
  }
  return vol
}

/**
 * acc + the triple product (a − c)·((b − a) × (q − a)) of the points at offsets a, b, q of P, with
 * c = (cx, cy, cz), m³ (= (a − c)·((b − c) × (q − c)), with the small edge vectors formed first);
 * one rounding order shared by every volume sum here.
 */
function addTriple(acc: number, P: Float64Array, a: number, b: number, q: number, cx: number, cy: number, cz: number): number {
  const ax = P[a]!, ay = P[a + 1]!, az = P[a + 2]!
  const ux = P[b]! - ax, uy = P[b + 1]! - ay, uz = P[b + 2]! - az
  const vx = P[q]! - ax, vy = P[q + 1]! - ay, vz = P[q + 2]! - az
  return acc + (ax - cx) * (uy * vz - uz * vy) + (ay - cy) * (uz * vx - ux * vz) + (az - cz) * (ux * vy - uy * vx)
}

/** Number of faces per component label 0 .. n−1. */
function countLabels(label: Uint32Array, n: number): number[] {
  const sizes = new Array<number>(n).fill(0)
  for (let f = 0; f < label.length; f++) sizes[label[f]!]!++
  return sizes
}

/** Reverses (corners 1 and 2) every face of a component with negative volume. */
function reverseInverted(I: Uint32Array, comp: Uint32Array, vol: Float64Array): void {
  for (let f = 0; f < comp.length; f++) {
    if (vol[comp[f]!]! < 0) { const t = I[3 * f + 1]!; I[3 * f + 1] = I[3 * f + 2]!; I[3 * f + 2] = t }
  }
}

/**
 * Follows face flips (corners 1 and 2 swapped where flip[f] = 1) in the half-edge twin table, in
 * place: in a flipped face the edge of half-edge k moves to slot 2 − k (0 ↔ 2, 1 stays). Same
 * result as pairing the flipped faces' edges again, without a new pairing.
 */
function reflectTwins(twin: Int32Array, flip: Int8Array): void {
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
function nonManifoldVertices(I: Uint32Array, corners: VertexCorners, twin: Int32Array): { bad: number, first: number[] } {
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

/**
 * True when the triangles I form a closed, consistently wound surface that is manifold at every
 * edge and every vertex: exactly what the edge analysis (no boundary, no non-manifold and no
 * same-direction edge) followed by the vertex-fan check accepts, without building half-edge
 * twins. Algorithm: a counting sort files each face corner under its vertex v as the pair
 * (next, previous) of the face's other vertices; around v, "previous of one face = next of the
 * following face" must link the pairs into one cycle through all of them. Every out-going edge v → w is then unique, matched by exactly one w → v, and the faces at
 * v form a single disk; vertices used by no face are ignored. Degenerate faces (a repeated vertex)
 * give false. Memory: 8 bytes per corner plus 4 per vertex, freed on return.
 */
export function closedOrientedManifold(I: Uint32Array, nv: number): boolean {
  const nh = I.length
  const start = new Uint32Array(nv + 1)
  for (let f = 0; f < nh; f += CORNER_BLOCK) if (!countCorners(I, f, Math.min(nh, f + CORNER_BLOCK), start)) return false
  for (let v = 0; v < nv; v++) start[v + 1] = start[v + 1]! + start[v]!
  // pairs[2k], pairs[2k + 1]: next and previous vertex of the k-th corner filed; the fill cursor
  // of vertex v starts at start[v] and ends at start[v + 1]
  const pairs = new Uint32Array(2 * nh)
  const cursor = start.slice(0, nv)
  for (let f = 0; f < nh; f += CORNER_BLOCK) fileCorners(I, f, Math.min(nh, f + CORNER_BLOCK), cursor, pairs)
  for (let v = 0; v < nv; v += VERTEX_BLOCK) if (!singleFans(start, pairs, v, Math.min(nv, v + VERTEX_BLOCK))) return false
  return true
}

/** Indices per call of the corner block functions; vertices per call of `singleFans`. */
const CORNER_BLOCK = 3 * 16384
const VERTEX_BLOCK = 16384

/** Counts the corners of faces [from, to) (× 3) per vertex into start[v + 1]; false at a face with a repeated vertex. */
function countCorners(I: Uint32Array, from: number, to: number, start: Uint32Array): boolean {
  for (let h = from; h < to; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    if (a === b || b === c || c === a) return false
    start[a + 1]!++; start[b + 1]!++; start[c + 1]!++
  }
  return true
}

/** Files the corners of faces [from, to) (× 3) as (next, previous) pairs at their vertex's cursor. */
function fileCorners(I: Uint32Array, from: number, to: number, cursor: Uint32Array, pairs: Uint32Array): void {
  for (let h = from; h < to; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    let k = 2 * cursor[a]!++
    pairs[k] = b; pairs[k + 1] = c
    k = 2 * cursor[b]!++
    pairs[k] = c; pairs[k + 1] = a
    k = 2 * cursor[c]!++
    pairs[k] = a; pairs[k + 1] = b
  }
}

/** Vertices [from, to) of `closedOrientedManifold`: does each one's corners link into a single cycle? */
function singleFans(start: Uint32Array, pairs: Uint32Array, from: number, to: number): boolean {
  for (let v = from; v < to; v++) {
    const s = 2 * start[v]!, e = 2 * start[v + 1]!
    if (s === e) continue
    // From the first corner, step to the first corner whose next vertex is this corner's previous
    // one. The walk is deterministic, so returning to the start after exactly as many steps as
    // there are corners means it met every corner once; each was then the first match of its next
    // vertex, so no two corners share a next vertex (nor, through the cycle, a previous one).
    let k = s, steps = 0
    do {
      const w = pairs[k + 1]!
      let j = s
      while (j < e && pairs[j] !== w) j += 2
      if (j === e) return false
      k = j
      steps += 2
    } while (k !== s && steps <= e - s)
    if (k !== s || steps !== e - s) return false
  }
  return true
}

export interface EdgeAnalysis {
  /** Other half-edge on the same edge, or −1 (boundary / non-manifold). Half-edge 3f+k runs from corner k to k+1 of face f. */
  twin: Int32Array
  /** 1 when the twin runs in the same direction (inconsistent winding); empty when sameDirEdges is 0. */
  sameDir: Uint8Array
  /** Paired edges whose two half-edges run the same way (0: winding consistent everywhere). */
  sameDirEdges: number
  boundary: number
  nonManifold: number
  /** Faces of the first boundary half-edges, ordered by (source vertex, half-edge id). */
  boundaryFaces: number[]
  /** Faces of the first non-manifold edges (each named by its lowest half-edge), same order. */
  nonManifoldFaces: number[]
}

/**
 * Edge incidence. Algorithm: a counting sort puts every half-edge h (stored as its id) into the
 * bucket of its smaller end vertex (CSR, buckets in vertex order, ids ascending inside a bucket,
 * larger end stored beside each id);
 * all half-edges of one edge then share a bucket of ~6 entries and are matched there by their
 * larger end. An edge with two half-edges is paired (same direction → `sameDir`), with one it is a
 * boundary edge, with more it is non-manifold. Memory: the buckets (8 bytes per half-edge, freed
 * on return) besides the result (5 bytes per half-edge). `skipDegenerate` ignores half-edges with equal ends.
 */
export function analyseEdges(I: Uint32Array, nv: number, skipDegenerate = false): EdgeAnalysis {
  return pairClosedConsistent(I, nv) ?? pairEdges(I, nv, skipDegenerate)
}

/**
 * Fast path for the usual input, a closed mesh wound consistently: every edge a–b is crossed once
 * as a → b and once as b → a. Only rising half-edges (lower → higher vertex) are bucketed, by
 * their lower end (counting sort, larger end stored beside each id); each falling half-edge then
 * looks in its lower end's bucket for its mate. Returns undefined as soon as the mesh is not of
 * this kind (a degenerate half-edge, more rising than falling half-edges, a falling one with no
 * or two candidate mates, a rising one claimed twice); the general pairing then decides. When it
 * succeeds every rising half-edge was claimed exactly once, so each edge has exactly one
 * half-edge each way: the result is the one the general pairing would give.
 */
function pairClosedConsistent(I: Uint32Array, nv: number): EdgeAnalysis | undefined {
  const nh = I.length
  const start = new Uint32Array(nv + 1)
  for (let h = 0; h < nh; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    if (a === b || b === c || c === a) return undefined
    if (a < b) start[a + 1]!++
    if (b < c) start[b + 1]!++
    if (c < a) start[c + 1]!++
  }
  for (let v = 0; v < nv; v++) start[v + 1] = start[v + 1]! + start[v]!
  if (2 * start[nv]! !== nh) return undefined
  const twin = new Int32Array(nh)
  const bucket = new Uint32Array(nh / 2), upper = new Uint32Array(nh / 2)
  for (let h = 0; h < nh; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    if (a < b) putRising(start, bucket, upper, twin, h, a, b)
    if (b < c) putRising(start, bucket, upper, twin, h + 1, b, c)
    if (c < a) putRising(start, bucket, upper, twin, h + 2, c, a)
  }
  // bucket of vertex v is now bucket[start[v−1] .. start[v]) (start[−1] read as 0)
  for (let h = 0; h < nh; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    if (a > b && !claimMate(start, bucket, upper, twin, h, b, a)) return undefined
    if (b > c && !claimMate(start, bucket, upper, twin, h + 1, c, b)) return undefined
    if (c > a && !claimMate(start, bucket, upper, twin, h + 2, a, c)) return undefined
  }
  return { twin, sameDir: NO_SAME_DIR, sameDirEdges: 0, boundary: 0, nonManifold: 0, boundaryFaces: [], nonManifoldFaces: [] }
}

/** `sameDir` of a pairing with no same-direction edge (shared, never written). */
const NO_SAME_DIR = new Uint8Array(0)

/** Files rising half-edge h (lo → hi) in bucket lo, not yet claimed. */
function putRising(start: Uint32Array, bucket: Uint32Array, upper: Uint32Array, twin: Int32Array, h: number, lo: number, hi: number): void {
  const k = start[lo]!++
  bucket[k] = h
  upper[k] = hi
  twin[h] = -1
}

/**
 * Falling half-edge h (hi → lo) claims the single rising lo → hi in bucket lo; false when there is
 * none, more than one, or it was already claimed.
 */
function claimMate(start: Uint32Array, bucket: Uint32Array, upper: Uint32Array, twin: Int32Array, h: number, lo: number, hi: number): boolean {
  let mate = -1
  for (let k = lo === 0 ? 0 : start[lo - 1]!, k1 = start[lo]!; k < k1; k++) {
    if (upper[k] === hi) { if (mate !== -1) return false; mate = bucket[k]! }
  }
  if (mate === -1 || twin[mate] !== -1) return false
  twin[h] = mate
  twin[mate] = h
  return true
}

/** General pairing (see `analyseEdges`): any mix of boundary, non-manifold and same-direction edges. */
function pairEdges(I: Uint32Array, nv: number, skipDegenerate: boolean): EdgeAnalysis {
  const nh = I.length
  const twin = new Int32Array(nh) // every entry is written below: −1 for skipped and unpaired half-edges
  const { start, bucket, upper } = bucketByLowerEnd(I, nv, skipDegenerate, twin)
  const sameDir = new Uint8Array(nh)
  let boundary = 0, nonManifold = 0, sameDirEdges = 0
  const boundaryHe: number[] = [], nonManifoldHe: number[] = []
  for (let v = 0; v < nv; v++) {
    const s0 = v === 0 ? 0 : start[v - 1]!, s1 = start[v]!
    for (let i = s0; i < s1; i++) {
      const b = upper[i]! >>> 1
      let seen = false // an earlier entry of this bucket already handled the edge v–b
      for (let j = s0; j < i; j++) if (upper[j]! >>> 1 === b) { seen = true; break }
      if (seen) continue
      const h = bucket[i]!
      let count = 1, mate = -1, mateDir = 0
      for (let j = i + 1; j < s1; j++) if (upper[j]! >>> 1 === b) { count++; mate = bucket[j]!; mateDir = upper[j]! & 1 }
      if (count === 2) {
        twin[h] = mate; twin[mate] = h
        if ((upper[i]! & 1) === mateDir) { sameDir[h] = 1; sameDir[mate] = 1; sameDirEdges++ }
      } else if (count === 1) {
        twin[h] = -1
        boundary++
        keepFirst(boundaryHe, h, I)
      } else {
        twin[h] = -1
        for (let j = i + 1; j < s1; j++) if (upper[j]! >>> 1 === b) twin[bucket[j]!] = -1
        nonManifold++
        keepFirst(nonManifoldHe, h, I) // h is the edge's lowest half-edge id (ids ascend in a bucket)
      }
    }
  }
  const faceOf = (h: number) => (h / 3) | 0
  return { twin, sameDir, sameDirEdges, boundary, nonManifold, boundaryFaces: boundaryHe.map(faceOf), nonManifoldFaces: nonManifoldHe.map(faceOf) }
}

/**
 * Counting sort of half-edge ids by their smaller end vertex. On return bucket v is
 * bucket[start[v−1] .. start[v]) (start[−1] read as 0): the fill cursor ends at the next bucket.
 * upper[k] is 2 × (larger end of half-edge bucket[k]) + (1 when it runs from the larger end),
 * stored so that the matching reads no face. Skipped (degenerate) half-edges get twin −1.
 */
function bucketByLowerEnd(I: Uint32Array, nv: number, skipDegenerate: boolean, twin: Int32Array) {
  const nh = I.length
  const start = new Uint32Array(nv + 1)
  for (let h = 0; h < nh; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    if (!skipDegenerate || a !== b) start[(a < b ? a : b) + 1]!++
    if (!skipDegenerate || b !== c) start[(b < c ? b : c) + 1]!++
    if (!skipDegenerate || c !== a) start[(c < a ? c : a) + 1]!++
  }
  for (let v = 0; v < nv; v++) start[v + 1] = start[v + 1]! + start[v]!
  const bucket = new Uint32Array(start[nv]!)
  const upper = new Uint32Array(start[nv]!)
  for (let h = 0; h < nh; h += 3) {
    const a = I[h]!, b = I[h + 1]!, c = I[h + 2]!
    if (!skipDegenerate || a !== b) place(start, bucket, upper, h, a, b); else twin[h] = -1
    if (!skipDegenerate || b !== c) place(start, bucket, upper, h + 1, b, c); else twin[h + 1] = -1
    if (!skipDegenerate || c !== a) place(start, bucket, upper, h + 2, c, a); else twin[h + 2] = -1
  }
  return { start, bucket, upper }
}

/** Puts half-edge h (a → b) at the fill cursor of its lower end's bucket. */
function place(start: Uint32Array, bucket: Uint32Array, upper: Uint32Array, h: number, a: number, b: number): void {
  const k = start[a < b ? a : b]!++
  bucket[k] = h
  upper[k] = a < b ? 2 * b : 2 * a + 1
}

/**
 * Keeps in `list` the MAX_LISTED half-edges that come first in the order (source vertex I[h], h),
 * the order in which a vertex-by-vertex scan of out-going half-edges would meet them.
 */
function keepFirst(list: number[], h: number, I: Uint32Array): void {
  const before = (x: number, y: number) => I[x]! < I[y]! || (I[x] === I[y] && x < y)
  if (list.length === MAX_LISTED && !before(h, list[MAX_LISTED - 1]!)) return
  let i = list.length
  list.push(h)
  while (i > 0 && before(h, list[i - 1]!)) { list[i] = list[i - 1]!; i-- }
  list[i] = h
  if (list.length > MAX_LISTED) list.pop()
}

/**
 * Pairs of faces that intersect and share no vertex, using a three-mesh-bvh BVH built on a
 * Float32 copy (`indirect: true`, so the index order is kept) cast against itself. Pairs that
 * share a vertex are not tested. Triangle tests use three-mesh-bvh's ExtendedTriangle (float32).
 */
export function findSelfIntersections(mesh: TriMesh, maxPairs = 10): { checked: true, count: number, firstPairs: [number, number][] } {
  const geom = new BufferGeometry()
  geom.setAttribute('position', new BufferAttribute(Float32Array.from(mesh.positions), 3))
  geom.setIndex(new BufferAttribute(mesh.indices.slice(), 1))
  const bvh = new MeshBVH(geom, { indirect: true, targetLeafSize: 8 })
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
  geom.dispose()
  return { checked: true, count, firstPairs }
}

/**
 * Connected components of faces joined through shared vertices (union-find on vertices).
 * Returns a component label per face (0 .. count−1, in order of first face) and the count.
 */
export function faceComponents(mesh: TriMesh): { label: Uint32Array, count: number } {
  const I = mesh.indices
  const nv = mesh.positions.length / 3
  const parent = vertexRoots(I, nv)
  const label = new Uint32Array(I.length / 3)
  let roots = 0
  for (let v = 0; v < nv; v++) if (parent[v] === v) roots++
  // a single set (the rule on validated meshes, which have no unused vertices): all labels 0
  if (roots === 1) return { label, count: 1 }
  const lab = new Int32Array(nv).fill(-1)
  let count = 0
  for (let f = 0; f < label.length; f++) {
    const r = parent[I[3 * f]!]!
    if (lab[r] === -1) lab[r] = count++
    label[f] = lab[r]!
  }
  return { label, count }
}

/**
 * Union-find over the vertices of faces I: each face joins its three corners; a root is linked
 * under the smaller root (so every root is its set's smallest vertex) and paths are halved on the
 * way. Returns parent with every entry pointing straight at its root.
 */
function vertexRoots(I: Uint32Array, nv: number): Uint32Array {
  const parent = new Uint32Array(nv)
  for (let v = 0; v < nv; v++) parent[v] = v
  for (let i = 0; i < I.length; i += 3) {
    const a = findRoot(parent, I[i]!), b = findRoot(parent, I[i + 1]!), c = findRoot(parent, I[i + 2]!)
    const lo = a < b ? a : b, hi = a < b ? b : a
    if (lo !== hi) parent[hi] = lo
    if (c < lo) parent[lo] = c
    else if (c !== lo) parent[c] = lo
  }
  // roots are the smallest vertex of their set, so one pass in vertex order flattens every path
  for (let v = 0; v < nv; v++) parent[v] = parent[parent[v]!]!
  return parent
}

/** Root of v, halving the path on the way. */
function findRoot(parent: Uint32Array, v: number): number {
  while (parent[v] !== v) { const g = parent[parent[v]!]!; parent[v] = g; v = g }
  return v
}
