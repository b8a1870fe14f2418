import { readdir, rm } from 'node:fs/promises'
import { basename, join, relative, sep } from 'node:path'
import { and, eq, ne, sql } from 'drizzle-orm'
import type { Lobe } from '../db/schema'

/**
 * A local file (an upload formidable wrote under UPLOADS_DIR/tmp) as a mesh-store key: the file
 * itself for the folder store, or a copy put in the object store's `tmp/` (the local file removed).
 */
export async function stageLocalFile(filePath: string): Promise<string> {
  const store = await useMeshStore()
  const root = useConfig().uploadsDir
  if (store.kind === 'folder' && filePath.startsWith(root + sep)) return relative(root, filePath).split(sep).join('/')
  const { readFile } = await import('node:fs/promises')
  const key = `tmp/${basename(filePath)}`
  await store.write(key, new Uint8Array(await readFile(filePath)))
  await rm(filePath, { force: true })
  return key
}

/** Store keys of derived files some row refers to. */
async function referencedDerived(db: DB): Promise<Set<string>> {
  const keep = new Set<string>()
  for (const l of await db.select({ sha256: schema.lobes.sha256, units: schema.lobes.units, surface: schema.lobes.surface }).from(schema.lobes)) {
    const k = derivedMeshKeys(l.sha256, l.units)
    keep.add(k.analysis).add(k.display)
    const f = (l.surface as { fieldsFile?: string } | null)?.fieldsFile
    if (f) keep.add(derivedKey(f))
  }
  for (const s of await db.select({ cacheKey: schema.studies.cacheKey }).from(schema.studies)) {
    const k = studyMeshKeys(s.cacheKey)
    keep.add(k.analysis).add(k.display)
  }
  for (const j of await db.select({ id: schema.jobs.id, status: schema.jobs.status, result: schema.jobs.result }).from(schema.jobs).where(eq(schema.jobs.kind, 'surface-field'))) {
    if (j.status === 'queued' || j.status === 'running') keep.add(derivedKey(`fields-${j.id}.json`))
    const f = (j.result as { fieldsFile?: string } | null)?.fieldsFile
    if (f) keep.add(derivedKey(f))
  }
  return keep
}

/**
 * Start-up sweep: temporary files (uploads cut off by a stop, partial writes) and stored or derived
 * files no row refers to are deleted. With Redis (several app processes may share the store) only
 * temporary files older than an hour go, so another process's upload in flight is left alone.
 */
export async function sweepStorage(db: DB) {
  const store = await useMeshStore()
  const cutoff = useConfig().redisUrl ? Date.now() - 3600_000 : Infinity
  let removed = 0
  const { tmp } = uploadPaths()
  for (const name of await readdir(tmp).catch(() => [] as string[])) {
    await rm(join(tmp, name), { recursive: true, force: true })
    removed++
  }
  if (store.kind === 's3') {
    for (const o of await store.list('tmp/')) {
      if (o.modifiedMs < cutoff) {
        await store.remove(o.key)
        removed++
      }
    }
  }
  const keep = await referencedDerived(db)
  for (const o of await store.list('derived/')) {
    if (!keep.has(o.key) && o.modifiedMs < cutoff) {
      await store.remove(o.key)
      removed++
    }
  }
  const stored = new Set((await db.select({ p: schema.meshFiles.storedPath }).from(schema.meshFiles)).map(r => r.p.split(sep).join('/')))
  for (const o of await store.list('meshes/')) {
    if (!stored.has(o.key) && o.modifiedMs < cutoff) {
      await store.remove(o.key)
      removed++
    }
  }
  if (removed) console.info(`[isthmus] start-up sweep removed ${removed} file${removed === 1 ? '' : 's'} no row refers to`)
}

/**
 * Deletes a deleted lobe's files that nothing else uses: its stored mesh (when `meshGone`), its
 * analysis and display meshes when no other lobe has the same file and units, its fields file
 * when no other lobe shows it (the job that made it then forgets it, so nothing reuses it).
 */
export async function deleteLobeFiles(db: DB, lobe: Lobe, storedPath: string | undefined) {
  const store = await useMeshStore()
  if (storedPath) await store.remove(storedPath.split(sep).join('/'))
  const sameMesh = await db.select({ id: schema.lobes.id }).from(schema.lobes)
    .where(and(eq(schema.lobes.sha256, lobe.sha256), eq(schema.lobes.units, lobe.units), ne(schema.lobes.id, lobe.id))).get()
  if (!sameMesh) {
    const k = derivedMeshKeys(lobe.sha256, lobe.units)
    await store.remove(k.analysis)
    await store.remove(k.display)
  }
  const fieldsFile = (lobe.surface as { fieldsFile?: string } | null)?.fieldsFile
  if (fieldsFile) {
    const shown = await db.select({ id: schema.lobes.id }).from(schema.lobes)
      .where(and(sql`json_extract(${schema.lobes.surface}, '$.fieldsFile') = ${fieldsFile}`, ne(schema.lobes.id, lobe.id))).get()
    if (!shown) {
      await db.update(schema.jobs).set({ result: null }).where(and(eq(schema.jobs.kind, 'surface-field'), sql`json_extract(${schema.jobs.result}, '$.fieldsFile') = ${fieldsFile}`))
      await store.remove(derivedKey(fieldsFile))
    }
  }
  // Its surface job stops when no other lobe follows it.
  if (lobe.surfaceJobId) {
    const follows = await db.select({ id: schema.lobes.id }).from(schema.lobes).where(and(eq(schema.lobes.surfaceJobId, lobe.surfaceJobId), ne(schema.lobes.id, lobe.id))).get()
    if (!follows) await cancelJob(db, lobe.surfaceJobId, 'the lobe was deleted')
  }
}

/** Deletes lobes made moments ago by a request that then failed (e.g. the second part of a split), with their files. */
export async function undoLobes(db: DB, lobes: Lobe[]) {
  for (const lobe of lobes) {
    await db.delete(schema.lobes).where(eq(schema.lobes.id, lobe.id))
    const others = await db.select({ id: schema.lobes.id }).from(schema.lobes).where(eq(schema.lobes.sha256, lobe.sha256)).get()
    let storedPath: string | undefined
    if (!others) {
      const [gone] = await db.delete(schema.meshFiles).where(eq(schema.meshFiles.sha256, lobe.sha256)).returning()
      storedPath = gone?.storedPath
    }
    await deleteLobeFiles(db, lobe, storedPath)
  }
}
