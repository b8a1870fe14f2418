import { mkdirSync } from 'node:fs'
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
