import { RECORD_SUBJECT_LABELS, type RecordSubject } from '#shared/types/quantities'

/**
 * What a record says about its lobes, for checking the subject of a value against its source: the
 * lobes linked to it, the studies linked to it (each with its lobe A and lobe B) and the subjects
 * under which values from each lobe were filed (rejected values left out).
 */
export interface RecordSubjectContext {
  lobeIds: number[]
  studies: { id: number, lobeAId: number, lobeBId: number }[]
  /** Values filed from lobes: lobe id → subjects used (lobe A, lobe B, whole body). */
  filings: { attachmentId: number, lobeId: number, subject: string }[]
}

/** The side a lobe takes in the studies linked to the record (the first study naming it). */
function sideInStudies(lobeId: number, ctx: RecordSubjectContext): { subject: 'lobe-a' | 'lobe-b', studyId: number } | null {
  for (const s of ctx.studies) {
    if (s.lobeAId === lobeId) return { subject: 'lobe-a', studyId: s.id }
    if (s.lobeBId === lobeId) return { subject: 'lobe-b', studyId: s.id }
  }
  return null
}

/** The distinct lobes the record knows of: linked ones and both lobes of each linked study. */
function knownLobes(ctx: RecordSubjectContext): Set<number> {
  return new Set([...ctx.lobeIds, ...ctx.studies.flatMap(s => [s.lobeAId, s.lobeBId])])
}

/**
 * A warning for the reviewer when a value's subject disagrees with its source, else null:
 * - a single lobe's value filed as the whole body of a record that has two lobes (two linked lobes, or
 *   a linked study of a pair);
 * - a lobe filed as lobe A (B) while a study linked to the record uses it as lobe B (A);
 * - a lobe filed under another side elsewhere on the record (lobe A here, lobe B there).
 * Study values have the subject of their quantity (checked when attached), so they get none.
 */
export function recordSubjectWarning(value: { id: number, subject: string, lobeId: number | null }, ctx: RecordSubjectContext): string | null {
  if (value.lobeId === null) return null
  const lobe = value.lobeId
  if (value.subject === 'whole-body') {
    const others = [...knownLobes(ctx)].filter(l => l !== lobe)
    if (others.length) {
      return `A single lobe's value (lobe #${lobe}) is filed as the whole body, but this record has two lobes (also #${others.join(', #')}): it probably describes lobe A or lobe B.`
    }
    return null
  }
  const side = sideInStudies(lobe, ctx)
  if (side && side.subject !== value.subject) {
    return `Lobe #${lobe} is ${RECORD_SUBJECT_LABELS[side.subject]} of study #${side.studyId} linked to this record, but this value is filed as ${RECORD_SUBJECT_LABELS[value.subject as RecordSubject] ?? value.subject}.`
  }
  const elsewhere = ctx.filings.find(f => f.lobeId === lobe && f.attachmentId !== value.id && f.subject !== value.subject && f.subject !== 'whole-body')
  if (elsewhere) {
    return `Values of lobe #${lobe} are also filed as ${RECORD_SUBJECT_LABELS[elsewhere.subject as RecordSubject] ?? elsewhere.subject} on this record (#${elsewhere.attachmentId}), but this one as ${RECORD_SUBJECT_LABELS[value.subject as RecordSubject] ?? value.subject}.`
  }
  return null
}

/** Names that say a lobe is the smaller or second one (common practice in naming, no source). */
const SECOND_LOBE_NAME = /\b(small|smaller|secondary|minor|lobe[\s_-]*b|b[\s_-]*lobe|neck[\s_-]*b)\b/i

/**
 * The subject to suggest when a lobe's values are attached to a record: always one lobe ("this
 * lobe"), never the whole body — the person confirms or changes it. In order: the side the lobe
 * takes in a study linked to the record, the side its earlier values there were filed under, the
 * free side when the other lobe is already filed, then the lobe's name (small / secondary / B → lobe B),
 * else lobe A.
 */
export function suggestLobeSubject(lobe: { id: number, name: string }, ctx: RecordSubjectContext | null): { subject: 'lobe-a' | 'lobe-b', reason: string } {
  if (ctx) {
    const side = sideInStudies(lobe.id, ctx)
    if (side) return { subject: side.subject, reason: `it is ${RECORD_SUBJECT_LABELS[side.subject]} of study #${side.studyId} linked to this record` }
    const own = ctx.filings.find(f => f.lobeId === lobe.id && (f.subject === 'lobe-a' || f.subject === 'lobe-b'))
    if (own) return { subject: own.subject as 'lobe-a' | 'lobe-b', reason: `its earlier values on this record are filed as ${RECORD_SUBJECT_LABELS[own.subject as RecordSubject]}` }
    const taken = new Set(ctx.filings.filter(f => f.lobeId !== lobe.id).map(f => f.subject))
    if (taken.has('lobe-a') && !taken.has('lobe-b')) return { subject: 'lobe-b', reason: 'another lobe is already filed as lobe A on this record' }
    if (taken.has('lobe-b') && !taken.has('lobe-a')) return { subject: 'lobe-a', reason: 'another lobe is already filed as lobe B on this record' }
  }
  if (SECOND_LOBE_NAME.test(lobe.name)) return { subject: 'lobe-b', reason: 'its name calls it the smaller or second lobe' }
  return { subject: 'lobe-a', reason: 'nothing on the record places it yet; lobe A is the usual name for the first (larger) lobe' }
}
