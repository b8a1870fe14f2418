import { ContactBvhCache, createSpreadContext, runContactStudy, runSpreadSample } from '#shared/geometry'
import type { ContactStudyInput, ContactStudyResult, SpreadContext, SpreadSample } from '#shared/geometry'
import { encodeAnalysisMesh } from '../../shared/utils/mesh-binary'
import type { TaskProgress } from './tasks'
import { displayBytes, loadAnalysisMesh, storeBytes } from './worker-io'

/** Contact tasks: a contact study of two lobes, and chunks of its spread. */

// BVHs are built once per mesh and kept while the worker lives (keyed by content hash and units).
const bvhCache = new ContactBvhCache()

export interface StudyPayload {
  analysisKeyA: string
  analysisKeyB: string
  keyA: string
  keyB: string
  input: Omit<ContactStudyInput, 'meshA' | 'meshB' | 'cache' | 'keyA' | 'keyB'>
  unionAnalysisKey: string
  unionDisplayKey: string
  displayFaceBudget: number
}
export type StudyTaskResult = Omit<ContactStudyResult, 'unionMesh'> & { unionStored: boolean }

async function study(p: StudyPayload, progress: TaskProgress): Promise<StudyTaskResult> {
  const [meshA, meshB] = await Promise.all([loadAnalysisMesh(p.analysisKeyA), loadAnalysisMesh(p.analysisKeyB)])
  const { unionMesh, ...result } = await runContactStudy({ ...p.input, meshA, meshB, cache: bvhCache, keyA: p.keyA, keyB: p.keyB }, { onProgress: progress })
  if (unionMesh) {
    await storeBytes(p.unionAnalysisKey, encodeAnalysisMesh(unionMesh.positions, unionMesh.indices))
    await storeBytes(p.unionDisplayKey, await displayBytes(unionMesh, p.displayFaceBudget))
  }
  return { ...result, unionStored: !!unionMesh }
}

export interface SpreadChunkPayload {
  analysisKeyA: string
  analysisKeyB: string
  /** Everything of the spread context but the meshes (which the worker loads and caches). */
  context: Omit<SpreadContext, 'meshA' | 'meshB' | 'unitA' | 'unitB' | 'cache'>
  contextKey: string
  start: number
  end: number
}
export type SpreadChunkResult = SpreadSample[]

let spreadContext: { key: string, ctx: SpreadContext } | undefined

/** Samples [start, end) of a spread; the job spreads its chunks over every worker. */
async function spreadChunk(p: SpreadChunkPayload, progress: TaskProgress): Promise<SpreadChunkResult> {
  if (spreadContext?.key !== p.contextKey) {
    const [meshA, meshB] = await Promise.all([loadAnalysisMesh(p.analysisKeyA), loadAnalysisMesh(p.analysisKeyB)])
    spreadContext = { key: p.contextKey, ctx: createSpreadContext({ ...p.context, meshA, meshB, cache: bvhCache }) }
  }
  const samples = []
  for (let i = p.start; i < p.end; i++) {
    samples.push(await runSpreadSample(spreadContext.ctx, i))
    progress((i + 1 - p.start) / (p.end - p.start), 'spread')
  }
  return samples
}

export const contactTasks = { 'study': study, 'spread-chunk': spreadChunk }
