/**
 * Version of the numerical methods, recorded with every derived value (provenance) and part of
 * every result cache key. Bump it when a change alters any computed number.
 */
export const ALGORITHM_VERSION = 'isthmus-geometry 0.3.0'
// 0.2.0: degree 3–4 moments in closed form per tetrahedron (was a degree-4 triangle quadrature)
// and the validation volume sum from edge vectors: the same quantities, rounded differently.
// 0.3.0: surface fields at every face of the analysis mesh by a treecode (was a simplified copy).
