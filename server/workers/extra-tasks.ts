/** Further worker tasks (contact studies) register here. */
export const extraTasks: Record<string, (payload: any, progress: (f: number, stage: string) => void) => Promise<unknown>> = {}
