import { decodeDisplayMesh, type DisplayMesh } from '#shared/utils/mesh-binary'

export interface DownloadProgress {
  /** Bytes received so far (body bytes; 0 for a cache revalidation answered 304 by the browser). */
  loaded: number
  /** Content-Length when the server sent it, else null. */
  total: number | null
}

/**
 * Fetches a binary body with progress reports, reading the stream chunk by chunk. The browser's
 * HTTP cache revalidates with If-None-Match on its own (the mesh routes answer 304 with the ETag).
 * Throws on a non-2xx answer with the server's message, and AbortError when `signal` fires.
 */
export async function fetchWithProgress(url: string, opts: { signal?: AbortSignal, onProgress?: (p: DownloadProgress) => void } = {}): Promise<ArrayBuffer> {
  const res = await fetch(url, { signal: opts.signal, credentials: 'same-origin' })
  if (!res.ok) {
    let message = `${res.status} ${res.statusText}`
    try {
      const body = await res.json() as { message?: string }
      if (body?.message) message = body.message
    }
    catch { /* not JSON */ }
    throw new Error(message)
  }
  const header = res.headers.get('content-length')
  const total = header ? Number(header) : null
  if (!res.body) {
    const buf = await res.arrayBuffer()
    opts.onProgress?.({ loaded: buf.byteLength, total })
    return buf
  }
  const reader = res.body.getReader()
  // One growing buffer, sized from Content-Length when known (no copy at the end then).
  let buf = new Uint8Array(total && total > 0 ? total : 1 << 16)
  let loaded = 0
  opts.onProgress?.({ loaded, total })
  try {
    for (;;) {
      const { done, value } = await reader.read()
      if (done) break
      if (loaded + value.byteLength > buf.byteLength) {
        const grown = new Uint8Array(Math.max(buf.byteLength * 2, loaded + value.byteLength))
        grown.set(buf.subarray(0, loaded))
        buf = grown
      }
      buf.set(value, loaded)
      loaded += value.byteLength
      opts.onProgress?.({ loaded, total })
    }
  }
  finally {
    reader.releaseLock()
  }
  return loaded === buf.byteLength ? buf.buffer : buf.slice(0, loaded).buffer
}

export type MeshState = 'idle' | 'downloading' | 'decoding' | 'ready' | 'error'

/**
 * One display mesh (`ISTHMF32`, see shared/utils/mesh-binary.ts) downloaded with progress. The
 * request starts when `url` becomes non-null, restarts when it changes, and is aborted when the
 * calling scope ends, so an unmounted viewer leaves no request behind.
 */
export function useMeshDownload(url: MaybeRefOrGetter<string | null>) {
  const mesh = shallowRef<DisplayMesh | null>(null)
  const state = ref<MeshState>('idle')
  const progress = ref<DownloadProgress>({ loaded: 0, total: null })
  const error = ref<string | null>(null)
  let controller: AbortController | null = null

  async function load(u: string) {
    controller?.abort()
    const ctl = new AbortController()
    controller = ctl
    mesh.value = null
    error.value = null
    state.value = 'downloading'
    progress.value = { loaded: 0, total: null }
    try {
      let last = 0
      const buf = await fetchWithProgress(u, {
        signal: ctl.signal,
        onProgress: (p) => {
          // Vue updates at most ~20 times a second, whatever the chunk rate.
          const now = performance.now()
          if (now - last > 50 || p.loaded === p.total) {
            last = now
            progress.value = p
          }
        },
      })
      if (ctl.signal.aborted) return
      progress.value = { loaded: buf.byteLength, total: buf.byteLength }
      state.value = 'decoding'
      mesh.value = decodeDisplayMesh(buf)
      state.value = 'ready'
    }
    catch (e) {
      if (ctl.signal.aborted) return
      error.value = (e as Error).message
      state.value = 'error'
    }
    finally {
      if (controller === ctl) controller = null
    }
  }

  watch(() => toValue(url), (u) => {
    if (u) void load(u)
    else {
      controller?.abort()
      mesh.value = null
      state.value = 'idle'
    }
  }, { immediate: true })
  onScopeDispose(() => controller?.abort())

  return { mesh, state, progress, error }
}
