import { describe, expect, it } from 'vitest'
import { MAX_FILE_NAME_LENGTH, normaliseFileName } from '../../../shared/utils/names'

describe('file names from uploads', () => {
  it('removes bidirectional overrides and control characters', () => {
    // U+202E RIGHT-TO-LEFT OVERRIDE would show "lobe‮jbo.exe" as "lobeexe.obj" (Unicode UAX #9).
    expect(normaliseFileName('lobe\u202Ejbo.exe')).toBe('lobejbo.exe')
    expect(normaliseFileName('a\u2066b\u2069c\u200F.obj')).toBe('abc.obj')
    expect(normaliseFileName('tab\there\u0000\u0085.ply')).toBe('tab here.ply')
  })

  it('stores NFC (a composed é whatever the client sent)', () => {
    // U+0065 U+0301 (e + combining acute) composes to U+00E9 under NFC (Unicode UAX #15).
    expect(normaliseFileName('lob\u0065\u0301.obj')).toBe('lob\u00E9.obj')
  })

  it('drops folders and bounds the length, keeping the extension', () => {
    expect(normaliseFileName('C:\\meshes\\..\\a.obj')).toBe('a.obj')
    const long = normaliseFileName(`${'x'.repeat(3000)}.obj`)
    expect([...long]).toHaveLength(MAX_FILE_NAME_LENGTH)
    expect(long.endsWith('.obj')).toBe(true)
    // Counted in code points: astral characters are not cut in half.
    const astral = normaliseFileName('🪨'.repeat(400))
    expect([...astral]).toHaveLength(MAX_FILE_NAME_LENGTH)
    expect(astral).not.toMatch(/[\uD800-\uDFFF](?![\uDC00-\uDFFF])/u)
  })
})
