import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { QueryTypes } from 'sequelize'
import { rmSync, readFileSync } from 'node:fs'
import path from 'node:path'
import v8 from 'node:v8'
import vm from 'node:vm'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { csv, HEADER, takenHoursAgo, uploadCsv, writeLargeCsv } from '../helpers/importFixtures'
import { AuditEntry, ImportBatch, Referral, Result } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

let t: TestApp
let nurse: StaffFixture
let admin: StaffFixture
let c: Client
let referralId: number
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  nurse = await makeStaff('nurse')
  admin = await makeStaff('admin')
  const surgeon = await makeStaff('surgeon')
  const procedureId = (await makeProcedure()).id
  const p = await makePatient({ mrn: 'CMT0001', sex: 'male' })
  referralId = (
    await makeReferral({ patientId: p.id, procedureId, surgeonId: surgeon.id }, { plannedSurgeryDate: addDays(todayIso(), 14) })
  ).id
  c = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
})

/** `n` Hb rows for one patient, one draw a minute apart, the `failAt`-th with a marker value. */
function hbRows(n: number, marker?: { at: number; value: number }): string {
  const base = Date.now() - 90 * 86_400_000
  const rows: (string | number)[][] = [HEADER]
  for (let i = 0; i < n; i++) {
    const at = new Date(base + i * 60_000).toISOString()
    rows.push(['CMT0001', 'HB', marker && i === marker.at ? marker.value : 140, 'g/L', at])
  }
  return csv(rows)
}

describe('a commit is all or nothing', () => {
  it(
    'when the database refuses a row in the second chunk of 1000, then ' + 'nothing from the file is stored, not even the first chunk',
    async () => {
      // A real failure inside MariaDB, mid-commit: a trigger refuses one marker value.
      await t.sequelize.query(
        `CREATE TRIGGER imports_test_refuse BEFORE INSERT ON results FOR EACH ROW
       BEGIN IF NEW.value_reported = 77.7 THEN SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'refused by the test trigger'; END IF; END`,
        { type: QueryTypes.RAW },
      )
      try {
        const res = await uploadCsv(c, hbRows(1500, { at: 1400, value: 77.7 }), { commit: true })
        expect(res.status).toBe(500)
        expect(await Result.count()).toBe(0)
        expect(await ImportBatch.count()).toBe(0)
        expect(await AuditEntry.count({ where: { action: 'import' } })).toBe(0)
        expect(await Referral.findByPk(referralId, { raw: true })).toMatchObject({ latestHbGL: null, anaemic: null })
      } finally {
        await t.sequelize.query('DROP TRIGGER IF EXISTS imports_test_refuse', { type: QueryTypes.RAW })
      }
    },
  )

  it(
    'when the database refuses an episode audit row after the last chunk, then nothing is stored: no result, batch, ' +
      'screening outcome or milestone (the per-episode writes share the transaction, H-128)',
    async () => {
      // The per-episode audit rows are queued beside the re-screening and the pre-aggregates' refreshes
      // (resultStore.ts rescreenAndAudit): a refusal among them must undo the whole file.
      await t.sequelize.query(
        `CREATE TRIGGER imports_test_refuse_audit BEFORE INSERT ON audit_entries FOR EACH ROW
       BEGIN IF NEW.action = 'import-results' THEN SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'refused by the test trigger'; END IF; END`,
        { type: QueryTypes.RAW },
      )
      try {
        const res = await uploadCsv(c, hbRows(1500, { at: 1400, value: 95 }), { commit: true })
        expect(res.status).toBe(500)
        expect(await Result.count()).toBe(0)
        expect(await ImportBatch.count()).toBe(0)
        expect(await AuditEntry.count({ where: { action: ['import', 'import-results'] } })).toBe(0)
        const [milestones] = await t.sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM referral_milestones', {
          type: QueryTypes.SELECT,
        })
        expect(Number(milestones!.n)).toBe(0)
        expect(await Referral.findByPk(referralId, { raw: true })).toMatchObject({ latestHbGL: null, anaemic: null })
      } finally {
        await t.sequelize.query('DROP TRIGGER IF EXISTS imports_test_refuse_audit', { type: QueryTypes.RAW })
      }
    },
  )

  it('when the same 1500 rows are committed without the trigger, then all 1500 are stored in one batch and audited', async () => {
    const res = await uploadCsv(c, hbRows(1500), { commit: true }).expect(201)
    expect(res.body.accepted).toBe(1500)
    expect(await Result.count({ where: { importBatchId: res.body.batchId } })).toBe(1500)
    expect(await AuditEntry.count({ where: { action: 'import', entity: 'import_batch', entityId: String(res.body.batchId) } })).toBe(1)
    expect(await AuditEntry.count({ where: { action: 'import-results', entity: 'referral', entityId: String(referralId) } })).toBe(1)
  })

  it(
    'when a row repeats one from an earlier chunk of the same file, then it is reported as repeated in the file, not as already ' +
      'stored',
    async () => {
      const body = hbRows(1200)
      const firstRow = body.split('\r\n')[1]
      const res = await uploadCsv(c, body + firstRow + '\r\n')
      expect(res.body).toMatchObject({ accepted: 1200, skipCounts: { 'duplicate-in-file': 1 } })
    },
  )
})

describe('a preview stores nothing and reports what the commit will store', () => {
  it(
    'when a 1200-row file with a repeat across chunks is previewed then committed, then both report the ' +
      'same figures and the preview left no row, batch or audit',
    async () => {
      const body = hbRows(1200)
      const file = body + body.split('\r\n')[1] + '\r\n'
      const preview = await uploadCsv(c, file).expect(200)
      expect(preview.body).toMatchObject({ committed: false, accepted: 1200, skippedTotal: 1, skipCounts: { 'duplicate-in-file': 1 } })
      expect(await Result.count()).toBe(0)
      expect(await ImportBatch.count()).toBe(0)
      expect(await AuditEntry.count({ where: { action: ['import', 'import-results'] } })).toBe(0)
      const commit = await uploadCsv(c, file, { commit: true }).expect(201)
      expect(commit.body).toMatchObject({
        committed: true,
        accepted: preview.body.accepted,
        skippedTotal: preview.body.skippedTotal,
        skipCounts: preview.body.skipCounts,
      })
      expect(await Result.count({ where: { importBatchId: commit.body.batchId } })).toBe(1200)
    },
  )
})

describe('reversing a batch', () => {
  it(
    'when a doctor reverses a batch with a reason, then its results are gone, the episode is re-screened and the reversal is ' + 'audited',
    async () => {
      const typed = await c.post(`/api/referrals/${referralId}/results`, {
        analyte: 'hb',
        value: 142,
        unit: 'g/L',
        takenAt: takenHoursAgo(100),
      })
      expect(typed.status).toBe(201)
      const res = await uploadCsv(c, csv([HEADER, ['CMT0001', 'HB', 98, 'g/L', takenHoursAgo(3)]]), { commit: true }).expect(201)
      // Hb 98 g/L in a man: anaemic by any threshold (WHO men 130 g/L).
      expect(await Referral.findByPk(referralId, { raw: true })).toMatchObject({ latestHbGL: 98, anaemic: 1 })
      // Least privilege: an administrator reads no patient record and takes no results out.
      const asAdmin = await new Client(t.app).mustSignIn(admin.email, admin.password)
      const refused = await asAdmin.post(`/api/imports/${res.body.batchId}/reversal`, { reason: 'wrong patient file' })
      expect(refused.status).toBe(403)
      const adminUpload = await uploadCsv(asAdmin, csv([HEADER, ['CMT0001', 'HB', 98, 'g/L', takenHoursAgo(3)]]))
      expect(adminUpload.status).toBe(403)

      const doctor = await makeStaff('doctor')
      const a = await new Client(t.app).mustSignIn(doctor.email, doctor.password)
      const noReason = await a.post(`/api/imports/${res.body.batchId}/reversal`, {})
      expect(noReason.status).toBe(400)
      expect(noReason.body.error.fields.reason).toMatch(/required/)
      const done = await a.post(`/api/imports/${res.body.batchId}/reversal`, { reason: 'File belonged to another hospital' })
      expect(done.status, JSON.stringify(done.body)).toBe(200)
      expect(done.body).toMatchObject({
        reversalReason: 'File belonged to another hospital',
        resultsRemoved: 1,
        reversedBy: { id: doctor.id },
      })
      expect(await Result.count({ where: { importBatchId: res.body.batchId } })).toBe(0)
      // Back to the typed-in Hb: 142 g/L, not anaemic.
      expect(await Referral.findByPk(referralId, { raw: true })).toMatchObject({ latestHbGL: 142, anaemic: 0 })
      expect(await AuditEntry.count({ where: { action: 'reverse', entity: 'import_batch' } })).toBe(1)
      const again = await a.post(`/api/imports/${res.body.batchId}/reversal`, { reason: 'second time' })
      expect(again.status).toBe(422)
      const list = await a.get('/api/imports').expect(200)
      expect(list.body.rows[0]).toMatchObject({ id: res.body.batchId, reversedAt: expect.any(String) })
    },
  )
})

describe('reversing a batch that reached a closed episode', () => {
  it('when one of its episodes is closed, then the reversal is refused (422) and every result stays', async () => {
    const res = await uploadCsv(c, csv([HEADER, ['CMT0001', 'HB', 98, 'g/L', takenHoursAgo(3)]]), { commit: true }).expect(201)
    await Referral.update({ stage: 'closed' }, { where: { id: referralId } })
    const refused = await c.post(`/api/imports/${res.body.batchId}/reversal`, { reason: 'wrong patient file' })
    expect(refused.status).toBe(422)
    expect(refused.body.error).toMatchObject({
      code: 'episode_closed',
      message: expect.stringMatching(/closed episode.*cannot be reversed/),
    })
    expect(await Result.count({ where: { importBatchId: res.body.batchId } })).toBe(1)
    expect((await ImportBatch.findByPk(res.body.batchId, { raw: true }))!.reversedAt).toBeNull()
  })
})

describe('memory stays bounded', () => {
  it('when a ~10 MB file is previewed, then the server heap grows by far less than the rows it read (stream, chunks of 1000)', async () => {
    const file = path.join(process.env.FERROLANE_TEST_DATA_DIR || '.test-data', 'imports-10mb.csv')
    const bytes = writeLargeCsv(file, ['CMT0001'], 230_000)
    expect(bytes).toBeGreaterThan(9.5 * 1024 * 1024)
    const content = readFileSync(file)
    rmSync(file)
    // Live heap, not garbage: a full collection before each sample (gc exposed at run time).
    v8.setFlagsFromString('--expose-gc')
    const gc = vm.runInNewContext('gc') as () => void
    const live = () => {
      gc()
      return process.memoryUsage().heapUsed
    }
    const before = live()
    let peak = before
    // A full collection every second: often enough to catch 230 000 rows held at once (they would
    // stay for many seconds), rarely enough not to starve the preview on a busy 2-core machine.
    const timer = setInterval(() => {
      peak = Math.max(peak, live())
    }, 1000)
    try {
      const res = await uploadCsv(c, content)
      expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200)
      expect(res.body.accepted).toBe(230_000)
      // The response stays small: at most 1000 rows of each list.
      expect(res.body.acceptedRows).toHaveLength(1000)
    } finally {
      clearInterval(timer)
    }
    const growthMb = (peak - before) / 1024 / 1024
    console.info(`[imports] 10 MB preview: live heap grew ${growthMb.toFixed(1)} MB at peak`)
    // 230 000 parsed rows held at once would take well over 50 MB of live heap (a small JS
    // object costs ~100+ bytes, common practice); reading by chunks of 1000 keeps it under 24 MB.
    expect(growthMb).toBeLessThan(24)
    expect(await Result.count()).toBe(0)
  }, 300_000) // a memory check, not a timing one: generous, so only a real fault fails it
})
