import { z } from 'zod'

/**
 * zod compiles fast object parsers with `new Function` when the page allows it and probes for that
 * by trying once. The Content-Security-Policy forbids evaluating strings (no 'unsafe-eval'), so the
 * probe would be reported as a violation on every page: tell zod up front to use its plain parsers.
 */
export default defineNuxtPlugin({
  name: 'zod-jitless',
  enforce: 'pre',
  setup() {
    z.config({ jitless: true })
  },
})
