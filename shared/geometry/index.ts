/**
 * Public API of the numerical core: every function and type a caller outside shared/geometry may
 * use. Import it as `#shared/geometry`; the web client, where bundle size matters, imports from
 * the concern folder instead (e.g. `#shared/geometry/math/linalg`). Layout and conventions:
 * README.md beside this file; methods and sources: docs/ at the repository root.
 */
export * from './types'
// math: vectors, 3×3 matrices, quaternions; the symmetric eigen-solver; the seeded generator
export * from './math/linalg'
export * from './math/eigen'
export * from './math/rng'
export * from './math/special'
// meshes: generators and transforms, bounds, edges, components, compaction
export * from './mesh/generate'
export { vertexBounds } from './mesh/bounds'
export { analyseEdges, closedOrientedManifold } from './mesh/edges'
export type { EdgeAnalysis } from './mesh/edges'
export * from './mesh/components'
export * from './mesh/compact'
export * from './mesh/weld-close'
// reading and writing files
export { readMesh, sniffFormat, DEFAULT_MAX_FACES, DEFAULT_MAX_VERTICES } from './io/read'
export type { ReadOptions, ReadResult } from './io/read'
export { readObj, countObjStatements } from './io/obj'
export type { ObjLimits } from './io/obj'
export { readPly } from './io/ply'
export { parsePlyHeader } from './io/ply-header'
export type { PlyHeader, PlyLimits } from './io/ply-header'
export * from './io/writers'
// validation and repair
export { validateMesh } from './validate/validate'
export type { ValidatedMesh, ValidateOptions, ValidationReport, ValidationWarning } from './validate/report'
export { findSelfIntersections } from './validate/self-intersections'
// mass properties and harmonics
export * from './mass/mass'
export * from './mass/moments'
export * from './mass/harmonics'
// polyhedral gravity
export { preparePolyhedron, potential, potentialAndAcceleration, acceleration, solidAngleSum, surfaceFieldChunk, summarise } from './gravity/polyhedron'
export type { PolyhedronModel, SurfaceFieldOut } from './gravity/polyhedron'
export * from './gravity/surface'
export * from './gravity/solid-harmonics'
export * from './gravity/treecode'
export * from './gravity/tree-walk'
export * from './gravity/coefficients'
export * from './gravity/face-fields'
export * from './gravity/display-map'
// contact search
export { ContactBvhCache, buildContactBvh } from './contact/bvh'
export type { ContactBvh } from './contact/bvh'
export { meshDistance } from './contact/traversal'
export type { MeshDistanceResult } from './contact/traversal'
export { pointTriangleDistSq, segmentSegmentDistSq, triangleTriangleDistance, triangleTriangleTOI } from './contact/primitives'
export * from './contact/first-contact'
// neck, split, merged body
export * from './neck/section'
export * from './neck/neck'
export * from './neck/split'
export { overlapAndUnion, splitMeshByPlane, manifoldVolume } from './merge/booleans'
export { loadManifold } from './adapters/manifold'
export type { OverlapResult } from './merge/booleans'
export * from './merge/merged'
// approach kinematics, pathway screen, mutual potential
export * from './orbit/kinematics'
export * from './orbit/screen'
export * from './orbit/mutual'
// contact studies and their spread
export * from './study/contact-study'
export * from './study/spread'
export { warmPipeline } from './warm'
