import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, type TestApp } from '../helpers/app'
import type { Client } from '../helpers/agent'
import { csv, HEADER, importSetUp, takenHoursAgo, uploadCsv } from '../helpers/importFixtures'
import { Result } from '../../server/models/index'

/**
 * The natural-key look-up at its edges (issue 19 point 5 moved it from an OR of key ranges to a
 * join against the chunk's keys): a converted value within its rounding, a voided row and a
 * preliminary row already holding the key, and a repeat within the file. Preview and commit agree.
 */
let t: TestApp
let c: Client
let referralId: number
const T1 = takenHoursAgo(6)
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  const ready = await importSetUp(t, 'DUP0001')
  c = ready.c
  referralId = ready.referralId
  const base = {
    referralId,
    patientId: ready.patientId,
    takenAt: new Date(T1),
    valueReported: null,
    unitReported: null,
    enteredBy: null,
    derivedFrom: null,
    source: 'hl7',
  }
  // Already stored for this sample: iron 17.9 µmol/L (final), Hb 110 g/L (voided by the
  // laboratory), ferritin 30 µg/L (preliminary). The natural key's unique index holds all three.
  await Result.create({ ...base, analyte: 'iron', unitCanonical: 'µmol/L', valueCanonical: 17.9 })
  await Result.create({ ...base, analyte: 'hb', unitCanonical: 'g/L', valueCanonical: 110, voidedAt: new Date(), voidReason: 'deleted' })
  await Result.create({ ...base, analyte: 'ferritin', unitCanonical: 'µg/L', valueCanonical: 30, status: 'preliminary' })
})

// File rows 2..7. 100 µg/dL of iron is 17.91 µmol/L (× 0.1791, clinical reference §7): within the
// rounding of a whole µg/dL (± 0.09 µmol/L) of the stored 17.9; 101 µg/dL (18.09) is not.
const FILE = csv([
  HEADER,
  ['DUP0001', 'FE', 100, 'ug/dL', T1],
  ['DUP0001', 'FE', 101, 'ug/dL', T1],
  ['DUP0001', 'HB', 110, 'g/L', T1],
  ['DUP0001', 'FERR', 30, 'ug/L', T1],
  ['DUP0001', 'HB', 111, 'g/L', T1],
  ['DUP0001', 'HB', 111, 'g/L', T1],
])
const EXPECTED_SKIPS = [
  { row: 2, code: 'duplicate-stored' },
  { row: 4, code: 'duplicate-stored' },
  { row: 5, code: 'duplicate-stored' },
  { row: 7, code: 'duplicate-in-file' },
]

describe('duplicates found by the natural key', () => {
  it(
    'when a file repeats a stored value within its unit rounding, a voided and a preliminary stored row, and itself, then each is ' +
      'skipped with its reason and only the two new values are stored',
    async () => {
      const preview = await uploadCsv(c, FILE).expect(200)
      expect(preview.body).toMatchObject({ accepted: 2, skippedTotal: 4, skipCounts: { 'duplicate-stored': 3, 'duplicate-in-file': 1 } })
      expect(preview.body.skipped.map((s: { row: number; code: string }) => ({ row: s.row, code: s.code }))).toEqual(EXPECTED_SKIPS)
      expect(await Result.count()).toBe(3)

      const commit = await uploadCsv(c, FILE, { commit: true }).expect(201)
      expect(commit.body).toMatchObject({ accepted: 2, skippedTotal: 4, skipCounts: { 'duplicate-stored': 3, 'duplicate-in-file': 1 } })
      expect(commit.body.acceptedRows.map((r: { row: number }) => r.row)).toEqual([3, 6])
      const stored = await Result.findAll({ where: { referralId, importBatchId: commit.body.batchId }, raw: true })
      expect(stored.map((r) => [r.analyte, r.valueReported]).sort()).toEqual([
        ['hb', 111],
        ['iron', 101],
      ])
    },
  )

  it('when the same file is committed again, then every row is a stored duplicate, its own repeat included', async () => {
    await uploadCsv(c, FILE, { commit: true }).expect(201)
    const again = await uploadCsv(c, FILE, { commit: true }).expect(200)
    expect(again.body).toMatchObject({ accepted: 0, skipCounts: { 'duplicate-stored': 6 } })
    expect(await Result.count()).toBe(5)
  })

  it(
    'when a later chunk repeats, within its unit rounding, a value accepted in the first chunk, then preview and commit both call ' +
      'it repeated in the file',
    async () => {
      const T2 = takenHoursAgo(30)
      const filler = Array.from({ length: 1099 }, (_, i) => ['DUP0001', 'HB', 100 + (i % 50), 'g/L', takenHoursAgo(40 + i / 60)])
      // Row 2: 17.9 µmol/L; row 1102, in the second chunk of 1000: 100 µg/dL = 17.91 ± 0.09 µmol/L.
      const file = csv([HEADER, ['DUP0001', 'FE', 17.9, 'umol/L', T2], ...filler, ['DUP0001', 'FE', 100, 'ug/dL', T2]])
      const preview = await uploadCsv(c, file).expect(200)
      const commit = await uploadCsv(c, file, { commit: true }).expect(201)
      for (const res of [preview, commit]) {
        expect(res.body).toMatchObject({ rowsRead: 1101, accepted: 1100, skippedTotal: 1, skipCounts: { 'duplicate-in-file': 1 } })
        expect(res.body.skipped).toEqual([expect.objectContaining({ row: 1102, code: 'duplicate-in-file' })])
      }
    },
  )
})
