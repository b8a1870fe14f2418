import { describe, expect, it } from 'vitest'
import { GeometryError } from '#shared/geometry'

describe('GeometryError', () => {
  it('carries a code and issues', () => {
    const e = new GeometryError('open-mesh', 'mesh is open', [{ path: 'faces[3]', message: 'boundary edge' }])
    expect(e.code).toBe('open-mesh')
    expect(e.issues).toHaveLength(1)
    expect(e).toBeInstanceOf(Error)
  })
})
