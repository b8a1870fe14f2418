import { existsSync, mkdirSync } from 'node:fs'
import { join } from 'node:path'

/** Folders under UPLOADS_DIR: originals by hash, derived files by key, and formidable's temporary files. */
export function uploadPaths() {
  const root = useConfig().uploadsDir
  const paths = { root, meshes: join(root, 'meshes'), derived: join(root, 'derived'), tmp: join(root, 'tmp') }
  for (const p of [paths.meshes, paths.derived, paths.tmp]) mkdirSync(p, { recursive: true })
  return paths
}

/** Derived-file paths of a lobe mesh (validated, in metres), shared by every lobe with the same file and units. */
export function derivedMeshPaths(sha256: string, units: 'm' | 'km') {
  const { derived } = uploadPaths()
  const key = `${sha256}-${units}`
  return { analysis: join(derived, `${key}.analysis.bin`), display: join(derived, `${key}.display.bin`), key }
}

const pendingDisplay = new Map<string, Promise<string>>()

/**
 * The display copy of a lobe mesh, made on a worker when missing (after an upload, or when an older
 * server left none). Concurrent callers share one job. Resolves to the file path.
 */
export function ensureDisplayMesh(sha256: string, units: 'm' | 'km'): Promise<string> {
  const paths = derivedMeshPaths(sha256, units)
  if (existsSync(paths.display)) return Promise.resolve(paths.display)
  let pending = pendingDisplay.get(paths.key)
  if (!pending) {
    pending = useWorkerPool().run('display', { analysisMeshPath: paths.analysis, displayMeshPath: paths.display, displayFaceBudget: displayFaceBudget() }, { priority: 3 })
      .then(() => paths.display)
      .finally(() => pendingDisplay.delete(paths.key))
    pendingDisplay.set(paths.key, pending)
  }
  return pending
}
