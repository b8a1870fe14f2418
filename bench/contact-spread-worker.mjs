// Plain-JS entry for the benchmark's spread worker: registers tsx, then loads the TypeScript worker.
import { register } from 'tsx/esm/api'

register()
await import('./contact-spread-worker.ts')
