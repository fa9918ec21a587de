import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, type TestApp } from '../helpers/app'
import type { Client } from '../helpers/agent'
import type { StaffFixture } from '../helpers/factories'
import { makePatient, makeReferral } from '../helpers/pathwayFactories'
import { csv, HEADER, importSetUp, takenHoursAgo, uploadCsv } from '../helpers/importFixtures'
import { ImportBatch, Referral, Result } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

let t: TestApp
let nurse: StaffFixture
let c: Client
let openReferralId: number
const T1 = takenHoursAgo(5)
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  // Surgery in 10 days: an anaemic result should raise "surgery soon, still anaemic" (28-day window).
  const ready = await importSetUp(t, 'IMP0001', { plannedSurgeryDate: addDays(todayIso(), 10) })
  c = ready.c
  nurse = ready.nurse
  openReferralId = ready.referralId
  const b = await makePatient({ mrn: 'IMP0002' })
  await makeReferral({ patientId: b.id, procedureId: ready.procedureId, surgeonId: ready.surgeonId }, { stage: 'closed' })
})

/** One row for every reason a row is skipped, beside two good rows (file rows 2 and 3). */
const MIXED = csv([
  HEADER,
  ['IMP0001', 'HB', 105, 'g/L', T1],
  ['IMP0001', 'FERR', 12, 'ug/L', T1],
  ['IMP9999', 'HB', 120, 'g/L', T1],
  ['IMP0002', 'HB', 120, 'g/L', T1],
  ['IMP0001', 'GLUC', 5, 'mmol/L', T1],
  ['IMP0001', 'HB', 125, 'mg/dL', T1],
  ['IMP0001', 'HB', 12.5, 'g/L', T1],
  ['IMP0001', 'HB', 120, 'g/L', 'yesterday'],
  ['IMP0001', 'HB', 105, 'g/L', T1],
  ['IMP0001', 'CRP', '<5', 'mg/L', T1],
])

describe('preview of a laboratory CSV', () => {
  it('when a mixed file is previewed, then it counts 2 accepted and names each skipped row and why, and stores nothing', async () => {
    const res = await uploadCsv(c, MIXED)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ committed: false, rowsRead: 10, accepted: 2, skippedTotal: 8 })
    expect(res.body.batchId).toBeUndefined()
    const byRow = Object.fromEntries(res.body.skipped.map((s: { row: number; code: string; reason: string }) => [s.row, s]))
    expect(byRow[4]).toMatchObject({ code: 'unknown-mrn', reason: expect.stringMatching(/IMP9999/) })
    expect(byRow[5]).toMatchObject({ code: 'no-open-referral' })
    expect(byRow[6]).toMatchObject({ code: 'unknown-analyte', reason: expect.stringMatching(/GLUC/) })
    expect(byRow[7]).toMatchObject({ code: 'unknown-unit', reason: expect.stringMatching(/g\/L, g\/dL, mmol\/L/) })
    // The typed-in rule's own hint (shared/pathway/analytes implausibleValue).
    expect(byRow[8]).toMatchObject({ code: 'implausible-value', reason: expect.stringMatching(/looks like g\/dL/) })
    expect(byRow[9]).toMatchObject({ code: 'bad-date', reason: expect.stringMatching(/yesterday/) })
    expect(byRow[10]).toMatchObject({ code: 'duplicate-in-file' })
    expect(byRow[11]).toMatchObject({ code: 'implausible-value', reason: expect.stringMatching(/below or above a limit/) })
    expect(res.body.skipCounts).toEqual({
      'unknown-mrn': 1,
      'no-open-referral': 1,
      'unknown-analyte': 1,
      'unknown-unit': 1,
      'implausible-value': 2,
      'bad-date': 1,
      'duplicate-in-file': 1,
    })
    expect(
      res.body.acceptedRows.map((r: { row: number; analyte: string; valueCanonical: number }) => [r.row, r.analyte, r.valueCanonical]),
    ).toEqual([
      [2, 'hb', 105],
      [3, 'ferritin', 12],
    ])
    expect(await Result.count()).toBe(0)
    expect(await ImportBatch.count()).toBe(0)
  })

  it(
    'when units and codes are spelled as laboratories do (umol/L, LOINC 718-7, g/dL), then they are converted as typed-in results ' +
      'are (Hb g/dL ×10)',
    async () => {
      const res = await uploadCsv(c, csv([HEADER, ['IMP0001', '718-7', 10.4, 'g/dL', T1], ['IMP0001', 'Creatinine', 80, 'umol/L', T1]]))
      expect(res.body.accepted).toBe(2)
      expect(res.body.acceptedRows[0]).toMatchObject({ analyte: 'hb', valueCanonical: 104, unitCanonical: 'g/L' })
      expect(res.body.acceptedRows[1]).toMatchObject({ analyte: 'creatinine', unit: 'µmol/L', valueCanonical: 80 })
    },
  )
})

describe('committing an import', () => {
  it(
    'when the mixed file is committed, then the 2 rows are stored in one batch, the episode is re-screened and the worklist flags ' + 'it',
    async () => {
      const res = await uploadCsv(c, MIXED, { commit: true })
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      expect(res.body).toMatchObject({ committed: true, accepted: 2, referralsAffected: 1 })
      const rows = await Result.findAll({ where: { referralId: openReferralId }, raw: true })
      expect(rows.map((r) => [r.analyte, r.source, r.importBatchId])).toEqual(
        expect.arrayContaining([
          ['hb', 'lab-csv', res.body.batchId],
          ['ferritin', 'lab-csv', res.body.batchId],
        ]),
      )
      // Hb 105 g/L in a woman: anaemic (surgical threshold 130, Muñoz 2017); ferritin 12: absolute deficiency.
      expect(await Referral.findByPk(openReferralId, { raw: true })).toMatchObject({
        anaemic: 1,
        ironStatus: 'absolute-deficiency',
        proposedStage: 'clinic',
        latestHbGL: 105,
      })
      const flagged = await c.get('/api/worklist?flag=surgery-soon-anaemic').expect(200)
      expect(flagged.body.rows.map((r: { id: number }) => r.id)).toEqual([openReferralId])
      const batch = await c.get(`/api/imports/${res.body.batchId}`).expect(200)
      expect(batch.body).toMatchObject({
        kind: 'lab-csv',
        sourceName: 'Test laboratory',
        accepted: 2,
        skipped: 8,
        createdBy: { id: nurse.id },
      })
      expect(batch.body.sha256).toMatch(/^[0-9a-f]{64}$/)
    },
  )

  it('when the same file is imported again, then nothing is duplicated and the earlier batch is named', async () => {
    const first = await uploadCsv(c, MIXED, { commit: true }).expect(201)
    const again = await uploadCsv(c, MIXED, { commit: true })
    expect(again.status).toBe(200)
    expect(again.body).toMatchObject({ accepted: 0, sameFileAs: { batchId: first.body.batchId } })
    // Rows 2 and 3, and row 10 (the repeat of row 2), are now all in the record.
    expect(again.body.skipCounts['duplicate-stored']).toBe(3)
    expect(again.body.batchId).toBeUndefined()
    expect(await Result.count()).toBe(2)
    expect(await ImportBatch.count()).toBe(1)
  })

  it('when an overlapping file is imported, then only its new row is stored', async () => {
    await uploadCsv(c, MIXED, { commit: true }).expect(201)
    const res = await uploadCsv(c, csv([HEADER, ['IMP0001', 'HB', 105, 'g/L', T1], ['IMP0001', 'CRP', 4, 'mg/L', T1]]), {
      commit: true,
    }).expect(201)
    expect(res.body).toMatchObject({ accepted: 1, skipCounts: { 'duplicate-stored': 1 } })
    expect(await Result.count()).toBe(3)
  })

  it('when the same value of the same sample is then typed in, then 409 says it is already recorded and nothing is added', async () => {
    await uploadCsv(c, MIXED, { commit: true }).expect(201)
    const res = await c.post(`/api/referrals/${openReferralId}/results`, { analyte: 'hb', value: 105, unit: 'g/L', takenAt: T1 })
    expect(res.status).toBe(409)
    expect(res.body.error).toMatchObject({ code: 'duplicate_result', message: expect.stringMatching(/already recorded/) })
    expect(await Result.count()).toBe(2)
  })

  it(
    'when iron and TIBC of one sample and a creatinine arrive, then TSAT and eGFR are derived as for typed-in results (TSAT 10/60 = ' +
      '16.7 %, reference §7)',
    async () => {
      const res = await uploadCsv(
        c,
        csv([HEADER, ['IMP0001', 'FE', 10, 'umol/L', T1], ['IMP0001', 'TIBC', 60, 'umol/L', T1], ['IMP0001', 'CREAT', 80, 'umol/L', T1]]),
        { commit: true },
      ).expect(201)
      expect(res.body.derived).toBe(2)
      const tsat = await Result.findOne({ where: { referralId: openReferralId, analyte: 'tsat' }, raw: true })
      expect(tsat).toMatchObject({ valueCanonical: 16.7, source: 'derived', importBatchId: res.body.batchId })
      expect(await Result.count({ where: { analyte: 'egfr' } })).toBe(1)
    },
  )

  it(
    'when whole and fractional values alternate in one file, then each is stored exactly as read (the bulk insert sends them as ' +
      'decimal text, H-126)',
    async () => {
      const T2 = takenHoursAgo(4)
      const res = await uploadCsv(
        c,
        csv([
          HEADER,
          ['IMP0001', 'HB', 105, 'g/L', T1],
          ['IMP0001', 'FERR', 8.5, 'ug/L', T1],
          ['IMP0001', 'CRP', 0.3, 'mg/L', T1],
          ['IMP0001', 'CREAT', 79.56, 'umol/L', T1],
          ['IMP0001', 'HB', 12.3, 'g/dL', T2],
          ['IMP0001', 'FERR', 30, 'ug/L', T2],
        ]),
        { commit: true },
      ).expect(201)
      expect(res.body).toMatchObject({ accepted: 6 })
      const stored = await Result.findAll({ where: { importBatchId: res.body.batchId, source: 'lab-csv' }, raw: true })
      const seen = stored.map((r) => [r.analyte, r.valueCanonical, r.valueReported]).sort((a, b) => String(a).localeCompare(String(b)))
      expect(seen).toEqual([
        ['creatinine', 79.56, 79.56],
        ['crp', 0.3, 0.3],
        ['ferritin', 30, 30],
        ['ferritin', 8.5, 8.5],
        ['hb', 105, 105],
        ['hb', 123, 12.3],
      ])
    },
  )
})

describe('files and fields that are refused', () => {
  it('when the file is a PDF renamed .csv, then 415 says its content is not text (checked by its %PDF signature)', async () => {
    const pdf = Buffer.from('%PDF-1.4\n1 0 obj\n<< /Type /Catalog >>\nendobj\ntrailer\n<< /Root 1 0 R >>\n%%EOF\n')
    const res = await uploadCsv(c, pdf)
    expect(res.status).toBe(415)
    expect(res.body.error.message).toMatch(/application\/pdf/)
  })

  it('when the file holds NUL bytes (binary), then 415 and nothing is read', async () => {
    const res = await uploadCsv(c, Buffer.concat([Buffer.from('mrn,test_code\n'), Buffer.alloc(32)]))
    expect(res.status).toBe(415)
    expect(res.body.error.message).toMatch(/binary/)
  })

  it('when the file is a spreadsheet workbook, then 415 asks for CSV', async () => {
    const res = await uploadCsv(c, 'a,b\n', {
      fileName: 'results.xlsx',
      contentType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
    })
    expect(res.status).toBe(415)
    expect(res.body.error.fields.file).toMatch(/CSV/)
  })

  it('when the file is over 20 MB, then 413 states the limit and nothing is stored', async () => {
    const res = await uploadCsv(c, Buffer.alloc(20 * 1024 * 1024 + 10, 0x41))
    expect(res.status).toBe(413)
    expect(res.body.error.message).toMatch(/20 MB/)
    expect(await ImportBatch.count()).toBe(0)
  })

  it('when no file or no source is sent, then 400 names the field', async () => {
    const noFile = await c.agent
      .post('/api/imports/lab-results')
      .set('X-CSRF-Token', c.csrf)
      .field('source', 'Lab')
      .field('commit', 'false')
    expect(noFile.status).toBe(400)
    expect(noFile.body.error.fields.file).toMatch(/required/)
    const noSource = await c.agent.post('/api/imports/lab-results').set('X-CSRF-Token', c.csrf).attach('file', Buffer.from(MIXED), 'r.csv')
    expect(noSource.status).toBe(400)
    expect(noSource.body.error.fields.source).toMatch(/required/)
  })

  it('when the header lacks a mapped column, then 422 names it and what the header holds', async () => {
    const res = await uploadCsv(
      c,
      csv([
        ['patient', 'test_code', 'value', 'unit', 'taken_at'],
        ['IMP0001', 'HB', 100, 'g/L', T1],
      ]),
    )
    expect(res.status).toBe(422)
    expect(res.body.error.message).toMatch(/no column "mrn".*patient/)
  })

  it('when a quote is never closed (malformed CSV, RFC 4180 §2), then 422 names the line and nothing is stored', async () => {
    const res = await uploadCsv(c, `${HEADER.join(',')}\nIMP0001,HB,105,g/L,${T1}\nIMP0001,"HB,106,g/L,${T1}\n`, { commit: true })
    expect(res.status).toBe(422)
    expect(res.body.error).toMatchObject({ code: 'csv_unreadable', message: expect.stringMatching(/line \d+/) })
    expect(await Result.count()).toBe(0)
    expect(await ImportBatch.count()).toBe(0)
  })

  it('when a row has fewer fields than the header, then that row is skipped as unreadable', async () => {
    const res = await uploadCsv(c, `${HEADER.join(',')}\nIMP0001,HB,105\nIMP0001,HB,106,g/L,${T1}\n`)
    expect(res.body).toMatchObject({ accepted: 1, skipped: [{ row: 2, code: 'bad-row' }] })
  })
})

describe('column mappings saved per source', () => {
  it(
    'when a nurse saves a mapping for a source, then an upload naming that source is read with it (semicolons, day-first dates, own ' +
      'codes)',
    async () => {
      const mapping = {
        columns: { mrn: 'Hosp No', code: 'Test', value: 'Result', unit: 'Units', takenAt: 'Collected' },
        delimiter: ';',
        dateOrder: 'dmy',
        codes: { HGBX: 'hb' },
      }
      const saved = await c.put('/api/imports/mappings/Northgate Pathology', { mapping })
      expect(saved.status, JSON.stringify(saved.body)).toBe(200)
      expect(saved.body).toMatchObject({ sourceName: 'Northgate Pathology', saved: true, mapping: { delimiter: ';' } })
      const d = new Date(Date.now() - 86_400_000)
      const dmy = `${String(d.getUTCDate()).padStart(2, '0')}/${String(d.getUTCMonth() + 1).padStart(2, '0')}/${d.getUTCFullYear()} 08:15`
      const file = `Hosp No;Test;Result;Units;Collected\nIMP0001;HGBX;11,2;g/dL;${dmy}\n`
      const res = await uploadCsv(c, file, { source: 'Northgate Pathology' })
      expect(res.body, JSON.stringify(res.body)).toMatchObject({ accepted: 1, acceptedRows: [{ analyte: 'hb', valueCanonical: 112 }] })
      const list = await c.get('/api/imports/mappings').expect(200)
      expect(list.body.rows.map((r: { sourceName: string }) => r.sourceName)).toEqual(['Northgate Pathology'])
    },
  )

  it('when a mapping maps two fields to one column or a code to an unknown analyte, then 400 names it', async () => {
    const same = await c.put('/api/imports/mappings/Lab', {
      mapping: { columns: { mrn: 'a', code: 'a', value: 'b', unit: 'c', takenAt: 'd' } },
    })
    expect(same.status).toBe(400)
    expect(JSON.stringify(same.body.error.fields)).toMatch(/its own column/)
    const bad = await c.put('/api/imports/mappings/Lab', {
      mapping: { columns: { mrn: 'a', code: 'b', value: 'c', unit: 'd', takenAt: 'e' }, codes: { X: 'glucose' } },
    })
    expect(bad.status).toBe(400)
    expect(JSON.stringify(bad.body.error.fields)).toMatch(/glucose/)
  })
})
