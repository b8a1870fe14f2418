// Worker for the contact benchmark's spread: runs sample indices [from, to) on its own context.
import { parentPort, workerData } from 'node:worker_threads'
import { createSpreadContext, runSpreadSample } from '#shared/geometry'

const { meshA, meshB, base, from, to } = workerData
const ctx = createSpreadContext({ ...base, meshA, meshB })
const out = []
for (let i = from; i < to; i++) out.push(await runSpreadSample(ctx, i))
parentPort!.postMessage(out)
