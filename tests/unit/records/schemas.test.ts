import { describe, expect, it } from 'vitest'
import { recordDesignationSchema, recordTagSchema } from '#shared/types/records'

const messages = (r: { success: boolean, error?: { issues: { message: string }[] } }) => r.error?.issues.map(i => i.message) ?? []

describe('record designation and tag fields: one message per problem', () => {
  it('an empty designation or tag gets only the "enter" message, not the character rule as well', () => {
    expect(messages(recordDesignationSchema.safeParse('  '))).toEqual(['Enter a designation'])
    expect(messages(recordTagSchema.safeParse(''))).toEqual(['Tags cannot be empty'])
  })
  it('bad characters still get the character rule; good values pass', () => {
    expect(messages(recordDesignationSchema.safeParse('#1'))).toEqual(['Use letters, digits, spaces and ( ) / \' + . _ - only'])
    expect(recordDesignationSchema.parse(' 2041 KD9 ')).toBe('2041 KD9')
    expect(recordTagSchema.parse('Twin-Lobe')).toBe('twin-lobe')
  })
})
