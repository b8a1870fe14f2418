import { afterEach, describe, expect, it, vi } from 'vitest'
import { GeometryError } from '../../../shared/geometry/types'
import { toHttpError } from '../../../server/utils/http-errors'

describe('geometry failures as HTTP errors', () => {
  afterEach(() => vi.restoreAllMocks())

  it('answers 422 with code and issues for a fault of the input', () => {
    const e = toHttpError(new GeometryError('open-mesh', 'validateMesh: the surface is open', [{ path: 'faces[3]', message: 'edge used once' }])) as { statusCode: number, data: unknown, message: string }
    expect(e.statusCode).toBe(422)
    expect(e.data).toEqual({ code: 'open-mesh', issues: [{ path: 'faces[3]', message: 'edge used once' }] })
    expect(e.message).toBe('the surface is open')
  })

  it('answers 500 with a reference id, logged with the error, for an internal fault', () => {
    const log = vi.spyOn(console, 'error').mockImplementation(() => undefined)
    for (const fault of [new GeometryError('BOOLEAN_FAILED', 'overlapAndUnion: union failed'), new GeometryError('BVH_FAILED', 'buildContactBvh: tree holds 3 of 4 faces'), new TypeError('x is undefined')]) {
      const e = toHttpError(fault) as { statusCode: number, data: { code: string, reference: string }, message: string }
      expect(e.statusCode).toBe(500)
      expect(e.data.code).toBe('internal')
      expect(e.data.reference).toMatch(/^[0-9a-f-]{36}$/)
      expect(e.message).toContain(e.data.reference)
      // Nothing internal is answered; the log line carries the same reference and the error.
      expect(e.message).not.toContain(fault.message)
      const line = log.mock.calls.at(-1)!
      expect(String(line[0])).toContain(e.data.reference)
      expect(line[1]).toBe(fault)
    }
  })
})
