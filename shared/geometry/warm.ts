/**
 * JIT warm-up for a process (or worker thread) that will analyse uploaded meshes: runs the read →
 * validate → mass-properties pipeline on small generated spheres, so that V8 has compiled the hot
 * loops before the first real mesh arrives. Without it the first large mesh in a fresh process
 * runs its first few thousand faces per kernel in the interpreter and waits for the optimising
 * compiler (about 0.1 s more on a million-face mesh; see `npm run bench`).
 */
import { readMesh } from './io/read'
import { writePly } from './io/writers'
import { massProperties } from './mass/mass'
import { icosphere } from './mesh/generate'
import { validateMesh } from './validate/validate'

/** `rounds` small spheres (20 480 faces each); about 0.4 s for the default 3 on a 2-core machine. */
export function warmPipeline(rounds = 3): void {
  const bytes = writePly(icosphere(5, 1), 'binary_little_endian')
  for (let r = 0; r < rounds; r++) {
    const v = validateMesh(readMesh(bytes).mesh)
    massProperties(v.mesh, { density: 1000, components: { label: v.componentLabels, count: v.report.components } })
  }
}
