import { mkdirSync } from 'node:fs'
import { join } from 'node:path'

/** Local folders under UPLOADS_DIR: formidable's temporary files (and, for the folder store, meshes and derived files). */
export function uploadPaths() {
  const root = useConfig().uploadsDir
  const paths = { root, meshes: join(root, 'meshes'), derived: join(root, 'derived'), tmp: join(root, 'tmp') }
  for (const p of [paths.meshes, paths.derived, paths.tmp]) mkdirSync(p, { recursive: true })
  return paths
}

/** Store key of a derived file (fields JSON, union meshes, analysis and display meshes). */
export function derivedKey(name: string) {
  return `derived/${name}`
}

/** Store keys of a lobe mesh's derived files (validated, in metres), shared by every lobe with the same file and units. */
export function derivedMeshKeys(sha256: string, units: 'm' | 'km') {
  const key = `${sha256}-${units}`
  return { analysis: derivedKey(`${key}.analysis.bin`), display: derivedKey(`${key}.display.bin`), key }
}

const pendingDisplay = new Map<string, Promise<string>>()

/**
 * The display copy of a lobe mesh, made on a worker when missing (after an upload, or when an older
 * server left none), as interactive work. Concurrent callers share one task. Resolves to its key.
 */
export async function ensureDisplayMesh(sha256: string, units: 'm' | 'km'): Promise<string> {
  const keys = derivedMeshKeys(sha256, units)
  if (await (await useMeshStore()).exists(keys.display)) return keys.display
  let pending = pendingDisplay.get(keys.key)
  if (!pending) {
    pending = runWorkerTask('display', { analysisKey: keys.analysis, displayKey: keys.display, displayFaceBudget: displayFaceBudget() }, { interactive: true, priority: 3 })
      .then(() => keys.display)
      .finally(() => pendingDisplay.delete(keys.key))
    pendingDisplay.set(keys.key, pending)
  }
  return pending
}
