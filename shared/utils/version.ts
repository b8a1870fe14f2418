/**
 * Version of the numerical methods, recorded with every derived value (provenance) and part of
 * every result cache key. Bump it when a change alters any computed number.
 */
export const ALGORITHM_VERSION = 'isthmus-geometry 0.1.0'
