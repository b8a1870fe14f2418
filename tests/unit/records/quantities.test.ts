import { readdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import { createClient } from '@libsql/client'
import { describe, expect, it } from 'vitest'
import { boxMesh, massProperties } from '#shared/geometry'
import { quantitiesFor, quantityDef, readQuantity, supersedeGroup, QuantityReadError, PAIR_QUANTITY_KEYS, RECORD_QUANTITIES, RECORD_SUBJECT_LABELS } from '#shared/types/quantities'
import { attachSchema, heliocentricOrbitSchema, objectCreateSchema } from '#shared/types/records'

const read = (key: string, source: unknown) => readQuantity(quantityDef(key)!, source)

describe('quantity catalogue', () => {
  it('has unique keys, a unit on every entry, and a fixed subject on every study quantity', () => {
    const keys = RECORD_QUANTITIES.map(q => q.key)
    expect(new Set(keys).size).toBe(keys.length)
    for (const q of RECORD_QUANTITIES) {
      expect(q.unit.length, q.key).toBeGreaterThan(0)
      if (q.source === 'study') expect(q.subject, q.key).toBeDefined()
      else expect(q.subject, q.key).toBeUndefined()
    }
  })

  it('reads every lobe mass property from the core\'s own output, unrounded', () => {
    // Box 2000 × 1000 × 500 m at 1500 kg m⁻³: V = abc and I_x = M(b² + c²)/12 (textbook closed forms).
    const props = massProperties(boxMesh(2000, 1000, 500), { density: 1500 })
    const lobe = { properties: props, surface: null }
    for (const def of quantitiesFor('lobe').filter(d => !d.summary)) {
      const q = readQuantity(def, lobe)
      expect(q.value, def.key).toEqual((props as unknown as Record<string, unknown>)[def.key])
    }
    expect(read('volume', lobe).value).toBeCloseTo(2000 * 1000 * 500, 0)
    expect(read('mass', lobe).value).toBe(props.mass)
    const M = props.mass
    const moments = read('principalMoments', lobe).value as number[]
    expect(moments[0]! / (M * (1000 ** 2 + 500 ** 2) / 12)).toBeCloseTo(1, 10)
    expect(moments[2]! / (M * (2000 ** 2 + 1000 ** 2) / 12)).toBeCloseTo(1, 10)
  })

  it('keeps the reference radius with gravity coefficients only', () => {
    const props = massProperties(boxMesh(2000, 1000, 500), { density: 1500, referenceRadius: 1234.5 })
    const lobe = { properties: props, surface: null }
    expect(read('J2', lobe).referenceRadius).toBe(1234.5)
    expect(read('C22', lobe).referenceRadius).toBe(1234.5)
    expect(read('mass', lobe).referenceRadius).toBeNull()
    expect(() => read('J2', { properties: { ...props, referenceRadius: undefined } })).toThrow(QuantityReadError)
  })

  it('takes the mean of a surface summary as the value and its range as a labelled spread', () => {
    const surface = { escapeSpeedSurface: { min: 0.41, max: 0.73, mean: 0.6 } }
    expect(read('escapeSpeedSurface', { properties: {}, surface })).toEqual({ key: 'escapeSpeedSurface', value: 0.6, unit: 'm s⁻¹', spread: { basis: 'surface-range', min: 0.41, max: 0.73 }, referenceRadius: null })
    expect(() => read('escapeSpeedSurface', { properties: {}, surface: null })).toThrow(/not available/)
  })

  it('reads study values and their spread entry; a study without contact has no contact values', () => {
    const result = {
      contact: { speed: 0.1 + 0.2 },
      merged: { J2: 0.1, referenceRadius: 900 },
      spread: { seed: 3, samples: 32, priors: 'p', speed: { min: 0.2, median: 0.3, max: 0.4, mean: 0.3, std: 0.05, n: 30 }, mergedJ2: null },
    }
    expect(read('contact.speed', result)).toEqual({ key: 'contact.speed', value: 0.30000000000000004, unit: 'm s⁻¹', referenceRadius: null, spread: { basis: 'study-spread', min: 0.2, median: 0.3, max: 0.4, mean: 0.3, std: 0.05, n: 30, seed: 3, samples: 32, priors: 'p' } })
    expect(read('merged.J2', result)).toMatchObject({ value: 0.1, referenceRadius: 900, spread: null })
    expect(() => read('contact.speed', { contact: { contact: false, reason: 'misses', pericentre: 5, separation: 4 } })).toThrow(QuantityReadError)
    expect(() => read('contact.speed', { contact: { speed: Number.NaN } })).toThrow(QuantityReadError)
  })

  it('groups values for superseding by quantity, subject and exact reference radius', () => {
    expect(supersedeGroup('J2', 'lobe-a', 1000.0000000000001)).not.toBe(supersedeGroup('J2', 'lobe-a', 1000))
    expect(supersedeGroup('J2', 'lobe-a', 0.1 + 0.2)).toBe(supersedeGroup('J2', 'lobe-a', 0.30000000000000004))
    expect(supersedeGroup('mass', 'lobe-a', null)).not.toBe(supersedeGroup('mass', 'lobe-b', null))
  })
})

describe('record form schemas', () => {
  it('validates orbits in au and degrees', () => {
    expect(heliocentricOrbitSchema.safeParse({ semiMajorAxisAu: 44, eccentricity: 0.1, inclinationDeg: 2 }).success).toBe(true)
    for (const bad of [{ semiMajorAxisAu: 0, eccentricity: 0.1, inclinationDeg: 2 }, { semiMajorAxisAu: 2, eccentricity: 1, inclinationDeg: 2 }, { semiMajorAxisAu: 2, eccentricity: 0.1, inclinationDeg: 181 }, { semiMajorAxisAu: Number.NaN, eccentricity: 0.1, inclinationDeg: 2 }]) {
      expect(heliocentricOrbitSchema.safeParse(bad).success, JSON.stringify(bad)).toBe(false)
    }
  })

  it('normalises tags and applies defaults on create', () => {
    const v = objectCreateSchema.parse({ designation: ' 2041 KD9 ', name: 'x', tags: ['B', 'a', 'b'] })
    expect(v).toMatchObject({ designation: '2041 KD9', population: 'other', notes: '', orbit: null, tags: ['a', 'b'] })
    expect(objectCreateSchema.safeParse({ designation: '<script>', name: 'x' }).success).toBe(false)
  })

  it('takes either a lobe or a study, an explicit subject (no default) and known quantity keys only', () => {
    expect(attachSchema.parse({ lobe: 1, subject: 'lobe-a', quantities: ['mass'] })).toMatchObject({ lobe: 1, subject: 'lobe-a' })
    // No subject: refused, naming the field.
    const bare = attachSchema.safeParse({ lobe: 1, quantities: ['mass'] })
    expect(bare.success).toBe(false)
    expect(bare.error!.issues.map(i => i.path.join('.'))).toEqual(['subject'])
    expect(bare.error!.issues[0]!.message).toMatch(/lobe A, lobe B, whole body/)
    expect(attachSchema.safeParse({ study: 2, quantities: ['merged.J2'] }).error!.issues.map(i => i.path.join('.'))).toEqual(['subject'])
    expect(attachSchema.safeParse({ lobe: 1, subject: 'merged-body', quantities: ['mass'] }).success).toBe(false)
    expect(attachSchema.safeParse({ lobe: 1, study: 2, subject: 'lobe-a', quantities: ['mass'] }).success).toBe(false)
    expect(attachSchema.safeParse({ subject: 'lobe-a', quantities: ['mass'] }).success).toBe(false)
    expect(attachSchema.safeParse({ study: 2, subject: 'merged-body', quantities: ['nope'] }).success).toBe(false)
    expect(attachSchema.safeParse({ study: 2, subject: 'merged-body', quantities: ['merged.J2', 'merged.J2'] }).success).toBe(false)
  })
})

describe('the lobe-pair subject', () => {
  it('files every contact-kinematics value under the lobe pair, and neck/merged values under their bodies', () => {
    for (const key of PAIR_QUANTITY_KEYS) expect(quantityDef(key)?.subject, key).toBe('lobe-pair')
    expect(quantitiesFor('study').filter(q => q.key.startsWith('contact.')).map(q => q.key).sort()).toEqual([...PAIR_QUANTITY_KEYS].sort())
    expect(quantityDef('neck.equivalentRadius')?.subject).toBe('whole-body')
    expect(quantityDef('merged.spinPeriod')?.subject).toBe('merged-body')
    expect(RECORD_SUBJECT_LABELS['lobe-pair']).toMatch(/lobe pair/)
    // A single lobe never stands for the pair.
    expect(attachSchema.safeParse({ lobe: 1, subject: 'lobe-pair', quantities: ['mass'] }).success).toBe(false)
  })

  it('migration 0005 moves stored pair values and their supersede groups together, leaving other values alone', async () => {
    const db = createClient({ url: ':memory:' })
    const dir = 'server/db/migrations'
    const files = readdirSync(dir).filter(f => /^\d{4}_.*\.sql$/.test(f)).sort()
    const run = async (f: string) => {
      for (const stmt of readFileSync(join(dir, f), 'utf8').split('--> statement-breakpoint')) if (stmt.trim()) await db.executeMultiple(stmt)
    }
    for (const f of files.filter(f => f < '0005')) await run(f)
    const insert = (id: number, key: string, subject: string, r: number | null, state: string) => db.execute({
      sql: `insert into attachments (id, object_id, quantity_key, subject, value, unit, supersede_group, provenance, state, proposed_by) values (?, 1, ?, ?, '1', 'm', ?, '{}', ?, 1)`,
      args: [id, key, subject, supersedeGroup(key, subject as never, r), state],
    })
    // Only the attachments table matters here; the record and member rows it points at are left out.
    await db.execute('PRAGMA foreign_keys = OFF')
    await insert(1, 'contact.speed', 'whole-body', null, 'superseded')
    await insert(2, 'contact.speed', 'whole-body', null, 'accepted')
    await insert(3, 'contact.massRatio', 'whole-body', null, 'proposed')
    await insert(4, 'neck.area', 'whole-body', null, 'accepted')
    await insert(5, 'merged.J2', 'merged-body', 1234.5, 'accepted')
    await insert(6, 'mass', 'whole-body', null, 'accepted')
    await run(files.find(f => f.startsWith('0005'))!)
    const rows = (await db.execute('select id, quantity_key, subject, supersede_group from attachments order by id')).rows
    // Each row's group must equal the one the code computes for its (new) subject, or superseding would split.
    for (const r of rows) expect(r.supersede_group, String(r.id)).toBe(supersedeGroup(String(r.quantity_key), r.subject as never, r.quantity_key === 'merged.J2' ? 1234.5 : null))
    expect(rows.map(r => r.subject)).toEqual(['lobe-pair', 'lobe-pair', 'lobe-pair', 'whole-body', 'merged-body', 'whole-body'])
  })
})
