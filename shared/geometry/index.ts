/** Public API of the numerical core. Import explicitly: `import { ... } from '~~/shared/geometry'`. */
export * from './types'
export * from './generate'
export * from './writers'
