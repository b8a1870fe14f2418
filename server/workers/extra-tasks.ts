import { readFile } from 'node:fs/promises'
import { ContactBvhCache, createSpreadContext, runContactStudy, runSpreadSample, splitAtNeck } from '#shared/geometry'
import type { ContactStudyInput, SpreadContext, TriMesh, Vec3 } from '#shared/geometry'
import { decodeAnalysisMesh, encodeAnalysisMesh } from '../../shared/utils/mesh-binary'
import { displayBytes, writeAtomic } from './worker-io'

type Progress = (f: number, stage: string) => void

// BVHs are built once per mesh file and kept while the worker lives (keyed by content hash).
const bvhCache = new ContactBvhCache()
const meshCache = new Map<string, TriMesh>()

async function loadAnalysisMesh(path: string): Promise<TriMesh> {
  let m = meshCache.get(path)
  if (!m) {
    m = decodeAnalysisMesh(new Uint8Array(await readFile(path)))
    if (meshCache.size >= 6) meshCache.delete(meshCache.keys().next().value!)
    meshCache.set(path, m)
  }
  return m
}

export interface StudyPayload {
  meshPathA: string
  meshPathB: string
  keyA: string
  keyB: string
  input: Omit<ContactStudyInput, 'meshA' | 'meshB' | 'cache' | 'keyA' | 'keyB'>
  unionAnalysisPath: string
  unionDisplayPath: string
  displayFaceBudget: number
}

async function study(p: StudyPayload, progress: Progress) {
  const [meshA, meshB] = await Promise.all([loadAnalysisMesh(p.meshPathA), loadAnalysisMesh(p.meshPathB)])
  const { unionMesh, ...result } = await runContactStudy({ ...p.input, meshA, meshB, cache: bvhCache, keyA: p.keyA, keyB: p.keyB }, { onProgress: progress })
  if (unionMesh) {
    await writeAtomic(p.unionAnalysisPath, encodeAnalysisMesh(unionMesh.positions, unionMesh.indices))
    await writeAtomic(p.unionDisplayPath, await displayBytes(unionMesh, p.displayFaceBudget))
  }
  return { ...result, unionStored: !!unionMesh }
}

export interface SpreadChunkPayload {
  meshPathA: string
  meshPathB: string
  /** Everything of the spread context but the meshes (which the worker loads and caches). */
  context: Omit<SpreadContext, 'meshA' | 'meshB' | 'unitA' | 'unitB' | 'cache'>
  contextKey: string
  start: number
  end: number
}

let spreadContext: { key: string, ctx: SpreadContext } | undefined

/** Samples [start, end) of a spread; the server spreads chunks over every worker. */
async function spreadChunk(p: SpreadChunkPayload, progress: Progress) {
  if (spreadContext?.key !== p.contextKey) {
    const [meshA, meshB] = await Promise.all([loadAnalysisMesh(p.meshPathA), loadAnalysisMesh(p.meshPathB)])
    spreadContext = { key: p.contextKey, ctx: createSpreadContext({ ...p.context, meshA, meshB, cache: bvhCache }) }
  }
  const samples = []
  for (let i = p.start; i < p.end; i++) {
    samples.push(await runSpreadSample(spreadContext.ctx, i))
    progress((i + 1 - p.start) / (p.end - p.start), 'spread')
  }
  return samples
}

export interface SplitPayload {
  meshPath: string
  plane?: { point: Vec3, normal: Vec3 }
  outPaths: [string, string]
}

async function split(p: SplitPayload, progress: Progress) {
  progress(0.1, 'finding the neck')
  const mesh = await loadAnalysisMesh(p.meshPath)
  const r = await splitAtNeck(mesh, { plane: p.plane })
  progress(0.8, 'writing lobes')
  await writeAtomic(p.outPaths[0], encodeAnalysisMesh(r.positive.positions, r.positive.indices))
  await writeAtomic(p.outPaths[1], encodeAnalysisMesh(r.negative.positions, r.negative.indices))
  return { plane: r.plane, neckArea: r.neckArea, positiveVolume: r.positiveVolume, negativeVolume: r.negativeVolume, profile: r.profile }
}

/** Further worker tasks: contact studies and splitting a whole-body mesh at its neck. */
export const extraTasks: Record<string, (payload: any, progress: Progress) => Promise<unknown>> = { 'study': study, 'split': split, 'spread-chunk': spreadChunk }
