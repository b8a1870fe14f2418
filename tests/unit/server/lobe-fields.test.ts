import { describe, expect, it } from 'vitest'
import { labelIssue, lobeUploadFieldsSchema } from '#shared/types/lobes'

describe('upload field messages read after the field labels, paths unchanged', () => {
  it('a density of 0, text or nothing names "Bulk density", with path "density"', () => {
    for (const [density, message] of [['0', 'Bulk density: must be at least 1 kg m⁻³'], ['abc', 'Bulk density: give it as a number in kg m⁻³, e.g. 500'], [undefined, 'Bulk density: give it as a number in kg m⁻³, e.g. 500'], ['20000', 'Bulk density: must be at most 10 000 kg m⁻³']] as const) {
      const r = lobeUploadFieldsSchema.safeParse({ density })
      expect(r.success).toBe(false)
      const issue = { path: r.error!.issues[0]!.path.join('.'), message: r.error!.issues[0]!.message }
      expect(issue.path).toBe('density')
      expect(labelIssue(issue)).toBe(message)
    }
  })
  it('the spin period and the units name their labels; an unknown path stays as it is', () => {
    const r = lobeUploadFieldsSchema.safeParse({ density: '500', spinPeriodHours: '-2', units: 'cm' })
    const shown = r.error!.issues.map(i => labelIssue({ path: i.path.join('.'), message: i.message }))
    expect(shown).toContain('Spin period: must be positive (h)')
    expect(shown).toContain('Coordinate units: must be m or km')
    expect(shown.join(' ')).not.toMatch(/spinPeriodHours|density:/)
    expect(labelIssue({ path: 'faces[3]', message: 'x' })).toBe('faces[3]: x')
  })
})
