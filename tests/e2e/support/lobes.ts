import type { Agent } from './http'

/** Uploads a mesh as the multipart form `POST /api/lobes` expects. */
export function uploadLobe(agent: Agent, bytes: Uint8Array, name: string, fields: Record<string, string>) {
  const form = new FormData()
  for (const [k, v] of Object.entries(fields)) form.set(k, v)
  form.set('file', new Blob([bytes as Uint8Array<ArrayBuffer>]), name)
  return agent.post('/api/lobes', form)
}

/** Polls a study until it leaves queued/running. */
export async function waitForStudy(agent: Agent, id: number, timeoutMs = 90_000) {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const s = (await agent.get(`/api/studies/${id}`)).json
    if (!['queued', 'running'].includes(s.status)) return s
    if (Date.now() > deadline) throw new Error(`study ${id} still ${s.status} (${s.stage} ${s.progress})`)
    await new Promise(r => setTimeout(r, 200))
  }
}

/** Polls a lobe until its surface job is done with fields on the lobe; throws on failure, cancel or timeout. */
export async function waitForField(agent: Agent, id: number, timeoutMs = 90_000) {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const lobe = (await agent.get(`/api/lobes/${id}`)).json
    const job = lobe.properties.gravityJob
    if (job?.status === 'done' && lobe.properties.surfaceGravity) return lobe
    if (job && ['failed', 'cancelled'].includes(job.status)) throw new Error(`surface job ${job.status}: ${job.error}`)
    if (Date.now() > deadline) throw new Error(`surface job still ${job?.status}`)
    await new Promise(r => setTimeout(r, 100))
  }
}
