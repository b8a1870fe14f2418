import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import { checkCoreLayout } from '../../../scripts/check-core-layout'

// Structure of the numerical core (shared/geometry/README.md "Layout"; common practice, no source):
// no import cycle, and each concern folder imports only from the folders listed before it.
describe('numerical core layout', () => {
  const r = checkCoreLayout(fileURLToPath(new URL('../../../shared/geometry', import.meta.url)))
  it('has no import cycle', () => {
    expect(r.cycles).toEqual([])
  })
  it('imports only from earlier concern folders', () => {
    expect(r.upward).toEqual([])
  })
})
