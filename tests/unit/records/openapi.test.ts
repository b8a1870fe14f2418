import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { RECORD_ROUTE_ACCESS } from '../../e2e/support/route-access-records'

describe('records OpenAPI document', () => {
  const doc = JSON.parse(readFileSync('server/openapi/records.json', 'utf8'))

  it('is OpenAPI 3.1 and documents exactly the record routes of the role matrix', () => {
    expect(doc.openapi).toBe('3.1.0')
    const documented = Object.entries(doc.paths as Record<string, Record<string, unknown>>).flatMap(([path, ops]) =>
      Object.keys(ops).filter(m => m !== 'parameters').map(m => `${m.toUpperCase()} ${path.replace(/\{(\w+)\}/g, ':$1')}`))
    expect(documented.sort()).toEqual(Object.keys(RECORD_ROUTE_ACCESS).sort())
  })

  it('resolves every $ref', () => {
    const refs = JSON.stringify(doc).match(/"\$ref":"#\/components\/[^"]+"/g) ?? []
    for (const r of refs) {
      const path = r.slice(9, -1).split('/').slice(1)
      let node: unknown = doc
      for (const p of path) node = (node as Record<string, unknown>)?.[p]
      expect(node, r).toBeDefined()
    }
  })
})
