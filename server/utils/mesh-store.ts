import { createReadStream } from 'node:fs'
import { mkdir, readdir, readFile, rename, rm, stat, writeFile } from 'node:fs/promises'
import { dirname, join, relative, resolve, sep } from 'node:path'
import type { Readable } from 'node:stream'
import { useConfig, type IsthmusConfig } from './config'

/**
 * Where meshes and derived files live, by key (`meshes/<sha>.ply`, `derived/<key>.analysis.bin`,
 * `tmp/<upload>`): a local folder (UPLOADS_DIR, the default) or, with S3_ENDPOINT and S3_BUCKET
 * set, an S3-compatible object store. The app, its worker threads and `npm run worker` processes
 * on other machines all read and write through this, so a task names keys, never paths.
 * Explicit imports only: the worker bundles import this file outside Nitro.
 */
export interface MeshStore {
  readonly kind: 'folder' | 's3'
  read: (key: string) => Promise<Uint8Array>
  /** Whole-object write; readers never see a half-written object (folder: temp file + rename). */
  write: (key: string, bytes: Uint8Array | string) => Promise<void>
  exists: (key: string) => Promise<boolean>
  size: (key: string) => Promise<number>
  stream: (key: string) => Promise<Readable>
  remove: (key: string) => Promise<void>
  move: (from: string, to: string) => Promise<void>
  /** Keys under a prefix with their last change (ms since 1970). */
  list: (prefix: string) => Promise<{ key: string, modifiedMs: number }[]>
  /** A local file path for a key (folder store only): where formidable already wrote an upload. */
  localPath?: (key: string) => string
}

function folderStore(root: string): MeshStore {
  const path = (key: string) => {
    const p = resolve(root, key)
    if (!p.startsWith(root + sep)) throw new Error(`mesh store: key outside the store: ${key}`)
    return p
  }
  const walk = async (dir: string): Promise<{ key: string, modifiedMs: number }[]> => {
    const entries = await readdir(dir, { withFileTypes: true }).catch(() => [])
    const out: { key: string, modifiedMs: number }[] = []
    for (const e of entries) {
      const full = join(dir, e.name)
      if (e.isDirectory()) out.push(...await walk(full))
      else out.push({ key: relative(root, full).split(sep).join('/'), modifiedMs: (await stat(full).catch(() => ({ mtimeMs: 0 }))).mtimeMs })
    }
    return out
  }
  return {
    kind: 'folder',
    read: async key => new Uint8Array(await readFile(path(key))),
    write: async (key, bytes) => {
      const p = path(key)
      await mkdir(dirname(p), { recursive: true })
      const tmp = `${p}.${process.pid}.${Math.random().toString(36).slice(2)}.tmp`
      await writeFile(tmp, bytes)
      await rename(tmp, p)
    },
    exists: key => stat(path(key)).then(() => true, () => false),
    size: async key => (await stat(path(key))).size,
    stream: async (key) => {
      await stat(path(key))
      return createReadStream(path(key))
    },
    remove: key => rm(path(key), { force: true }),
    move: async (from, to) => {
      await mkdir(dirname(path(to)), { recursive: true })
      await rename(path(from), path(to))
    },
    list: prefix => walk(path(prefix.replace(/\/+$/, ''))),
    localPath: path,
  }
}

async function s3Store(s: NonNullable<IsthmusConfig['s3']>): Promise<MeshStore> {
  const { S3Client, GetObjectCommand, PutObjectCommand, HeadObjectCommand, DeleteObjectCommand, CopyObjectCommand, ListObjectsV2Command, CreateBucketCommand } = await import('@aws-sdk/client-s3')
  const client = new S3Client({
    endpoint: s.endpoint, region: s.region, forcePathStyle: true,
    ...(s.accessKeyId && s.secretAccessKey ? { credentials: { accessKeyId: s.accessKeyId, secretAccessKey: s.secretAccessKey } } : {}),
  })
  const Bucket = s.bucket
  const full = (key: string) => (s.prefix ? `${s.prefix}/${key}` : key)
  const head = (key: string) => client.send(new HeadObjectCommand({ Bucket, Key: full(key) }))
  // A missing bucket is made once (test and demo stores start empty); an existing one is kept.
  await client.send(new CreateBucketCommand({ Bucket })).catch(() => undefined)
  return {
    kind: 's3',
    read: async (key) => {
      const r = await client.send(new GetObjectCommand({ Bucket, Key: full(key) }))
      return await r.Body!.transformToByteArray()
    },
    write: async (key, bytes) => {
      await client.send(new PutObjectCommand({ Bucket, Key: full(key), Body: typeof bytes === 'string' ? Buffer.from(bytes) : bytes }))
    },
    exists: key => head(key).then(() => true, () => false),
    size: async key => Number((await head(key)).ContentLength ?? 0),
    stream: async (key) => {
      const r = await client.send(new GetObjectCommand({ Bucket, Key: full(key) }))
      return r.Body as Readable
    },
    remove: async (key) => {
      await client.send(new DeleteObjectCommand({ Bucket, Key: full(key) }))
    },
    move: async (from, to) => {
      await client.send(new CopyObjectCommand({ Bucket, Key: full(to), CopySource: `${Bucket}/${full(from)}` }))
      await client.send(new DeleteObjectCommand({ Bucket, Key: full(from) }))
    },
    list: async (prefix) => {
      const out: { key: string, modifiedMs: number }[] = []
      let token: string | undefined
      do {
        const r = await client.send(new ListObjectsV2Command({ Bucket, Prefix: full(prefix), ContinuationToken: token }))
        for (const o of r.Contents ?? []) out.push({ key: s.prefix ? o.Key!.slice(s.prefix.length + 1) : o.Key!, modifiedMs: o.LastModified?.getTime() ?? 0 })
        token = r.IsTruncated ? r.NextContinuationToken : undefined
      } while (token)
      return out
    },
  }
}

let store: Promise<MeshStore> | undefined

/** The process's mesh store (one per process or worker thread), from the environment. */
export function useMeshStore(): Promise<MeshStore> {
  store ??= (async () => {
    const config = useConfig()
    return config.s3 ? s3Store(config.s3) : folderStore(config.uploadsDir)
  })()
  return store
}
