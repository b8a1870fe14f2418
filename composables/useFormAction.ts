import type { z } from 'zod'

export interface FormActionOptions {
  /**
   * The summary shown when the form's own check fails. Default: the first issue's message.
   * An empty string shows none (the field messages in `issues` say it all).
   */
  invalidSummary?: string
}

/**
 * One form submission: check the input with the same zod schema as the handler, then run the
 * request. While it runs `busy` is true and a second submit is ignored. `issues` maps a field path
 * ("orbit.eccentricity") to its message, from the local check or from a 422 answer's
 * `data.issues`; `error` is the summary. A string the action returns becomes `message` (success).
 */
export function useFormAction<S extends z.ZodType>(
  schema: S,
  action: (data: z.output<S>) => Promise<unknown>,
  options: FormActionOptions = {},
) {
  const error = ref('')
  const message = ref('')
  const issues = ref<Record<string, string>>({})
  const busy = ref(false)

  async function submit(input: unknown): Promise<boolean> {
    if (busy.value) return false
    error.value = ''
    message.value = ''
    issues.value = {}
    const parsed = schema.safeParse(input)
    if (!parsed.success) {
      issues.value = Object.fromEntries(parsed.error.issues.map(i => [i.path.map(String).join('.'), i.message]))
      error.value = options.invalidSummary ?? parsed.error.issues[0]?.message ?? 'Check the form'
      return false
    }
    busy.value = true
    try {
      const result = await action(parsed.data)
      message.value = typeof result === 'string' ? result : ''
      return true
    }
    catch (e) {
      error.value = errorMessage(e)
      issues.value = fieldIssues(e)
      return false
    }
    finally {
      busy.value = false
    }
  }

  return { submit, error, message, issues, busy }
}
