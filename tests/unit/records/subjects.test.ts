import { describe, expect, it } from 'vitest'
import { recordSubjectWarning, suggestLobeSubject, type RecordSubjectContext } from '../../../shared/utils/records-subjects'

// What a subject means is the product's own convention (lobe A / lobe B of a contact study); no outside source.
const empty: RecordSubjectContext = { lobeIds: [], studies: [], filings: [] }

describe('subject warnings', () => {
  it('warns when a single lobe is filed as the whole body of a record with two lobes', () => {
    const ctx: RecordSubjectContext = { lobeIds: [1, 2], studies: [], filings: [] }
    expect(recordSubjectWarning({ id: 5, subject: 'whole-body', lobeId: 1 }, ctx)).toMatch(/whole body.*two lobes.*#2/)
    // A record that only knows this lobe: whole body is plausible (a single-lobe shape model).
    expect(recordSubjectWarning({ id: 5, subject: 'whole-body', lobeId: 1 }, { ...empty, lobeIds: [1] })).toBeNull()
    // A linked study of a pair makes two lobes too.
    expect(recordSubjectWarning({ id: 5, subject: 'whole-body', lobeId: 1 }, { ...empty, lobeIds: [1], studies: [{ id: 3, lobeAId: 1, lobeBId: 2 }] })).toMatch(/two lobes/)
  })

  it('warns when the side disagrees with a linked study or with earlier filings of the same lobe', () => {
    const ctx: RecordSubjectContext = { lobeIds: [1, 2], studies: [{ id: 3, lobeAId: 1, lobeBId: 2 }], filings: [] }
    expect(recordSubjectWarning({ id: 5, subject: 'lobe-b', lobeId: 1 }, ctx)).toMatch(/lobe A of study #3.*filed as lobe B/)
    expect(recordSubjectWarning({ id: 5, subject: 'lobe-a', lobeId: 1 }, ctx)).toBeNull()
    const filed: RecordSubjectContext = { ...empty, lobeIds: [1], filings: [{ attachmentId: 4, lobeId: 1, subject: 'lobe-a' }] }
    expect(recordSubjectWarning({ id: 5, subject: 'lobe-b', lobeId: 1 }, filed)).toMatch(/also filed as lobe A.*#4/)
    // study values carry their quantity's subject
    expect(recordSubjectWarning({ id: 5, subject: 'merged-body', lobeId: null }, ctx)).toBeNull()
  })
})

describe('subject suggestions for a lobe', () => {
  it('never suggests the whole body', () => {
    for (const name of ['Main', 'primary body', 'whole body', 'x']) expect(suggestLobeSubject({ id: 1, name }, null).subject).not.toBe('whole-body')
  })

  it('follows the linked study, then earlier filings, then the free side, then the name', () => {
    expect(suggestLobeSubject({ id: 2, name: 'Big' }, { ...empty, studies: [{ id: 3, lobeAId: 1, lobeBId: 2 }] })).toMatchObject({ subject: 'lobe-b', reason: expect.stringMatching(/study #3/) })
    expect(suggestLobeSubject({ id: 2, name: 'x' }, { ...empty, filings: [{ attachmentId: 1, lobeId: 2, subject: 'lobe-b' }] }).subject).toBe('lobe-b')
    expect(suggestLobeSubject({ id: 2, name: 'x' }, { ...empty, filings: [{ attachmentId: 1, lobeId: 9, subject: 'lobe-a' }] }).subject).toBe('lobe-b')
    expect(suggestLobeSubject({ id: 2, name: 'Marrow pair — secondary' }, null).subject).toBe('lobe-b')
    expect(suggestLobeSubject({ id: 2, name: 'Tessaly — small lobe' }, empty).subject).toBe('lobe-b')
    expect(suggestLobeSubject({ id: 2, name: 'Tessaly — large lobe' }, empty).subject).toBe('lobe-a')
  })
})
