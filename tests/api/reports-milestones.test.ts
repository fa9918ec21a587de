import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { QueryTypes } from 'sequelize'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { csv, HEADER, takenHoursAgo, uploadCsv } from '../helpers/importFixtures'
import { MILESTONES_FROM_SCRATCH_SQL } from '../../server/migrations/0023-referral-milestones'

/**
 * referral_milestones is a pre-aggregate kept by database triggers (migration 0023). After each
 * kind of write to the four tables it is counted from, it must equal the same figures computed
 * from scratch.
 */
let t: TestApp
let nurse: Client
let doctor: Client
const ids: number[] = []

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  const n = await makeStaff('nurse')
  const d = await makeStaff('doctor')
  const surgeon = await makeStaff('surgeon')
  nurse = await new Client(t.app).mustSignIn(n.email, n.password)
  doctor = await new Client(t.app).mustSignIn(d.email, d.password)
  const proc = await makeProcedure({ code: 'TKR' })
  for (let i = 0; i < 3; i++) {
    const p = await makePatient({ mrn: `MS${i}00000` })
    ids.push((await makeReferral({ patientId: p.id, procedureId: proc.id, surgeonId: surgeon.id }, { stage: 'screened' })).id)
  }
})
afterAll(async () => { await t.close() })

type Row = Record<string, unknown>
const iso = (v: unknown) => (v == null ? null : new Date(v as string).toISOString())
const normal = (rows: Row[]) => rows
  .map((r) => ({
    referralId: Number(r.referral_id), firstHbAt: iso(r.first_hb_at), lastHbAt: iso(r.last_hb_at), firstDoseAt: iso(r.first_dose_at),
    clinicAt: iso(r.clinic_at), cleared: Number(r.cleared), operated: Number(r.operated), prescribed: Number(r.prescribed),
  }))
  // A row left with nothing in it (every source row deleted) says the same as no row.
  .filter((r) => r.firstHbAt || r.lastHbAt || r.firstDoseAt || r.clinicAt || r.cleared || r.operated || r.prescribed)
  .sort((a, b) => a.referralId - b.referralId)

async function expectSameAsFromScratch(): Promise<ReturnType<typeof normal>> {
  const kept = await t.sequelize.query<Row>('SELECT * FROM referral_milestones', { type: QueryTypes.SELECT })
  const scratch = await t.sequelize.query<Row>(MILESTONES_FROM_SCRATCH_SQL, { type: QueryTypes.SELECT })
  expect(normal(kept)).toEqual(normal(scratch))
  return normal(kept)
}

const exec = (sql: string, replacements: unknown[]) => t.sequelize.query(sql, { type: QueryTypes.RAW, replacements })

describe('referral milestones kept by triggers', () => {
  // Fixed once, so an assertion a second later compares the same instants.
  const at = Object.fromEntries([20, 40, 50, 300, 600, 900].map((h) => [h, takenHoursAgo(h)])) as Record<number, string>
  const ms = (h: number) => at[h]!.replace('Z', '.000Z')
  it('when Hb results are typed in, then the first and last Hb match a count from scratch', async () => {
    for (const [h, v] of [[300, 101], [50, 104], [600, 99]] as const) {
      const res = await nurse.post(`/api/referrals/${ids[0]}/results`, { analyte: 'hb', value: v, unit: 'g/L', takenAt: at[h] })
      expect(res.status, JSON.stringify(res.body)).toBe(201)
    }
    const rows = await expectSameAsFromScratch()
    expect(rows.find((r) => r.referralId === ids[0])?.firstHbAt).toBe(ms(600))
  })

  it('when a laboratory file is imported and then reversed, then the milestones follow each', async () => {
    const file = csv([HEADER, ['MS100000', 'HB', 95, 'g/L', at[40]!], ['MS100000', 'HB', 97, 'g/L', at[20]!], ['MS000000', 'HB', 120, 'g/L', at[900]!]])
    const imported = await uploadCsv(doctor, file, { commit: true })
    expect(imported.status, JSON.stringify(imported.body)).toBe(201)
    expect(imported.body.accepted).toBe(3)
    expect((await expectSameAsFromScratch()).find((r) => r.referralId === ids[0])?.firstHbAt).toBe(ms(900))
    const reversed = await doctor.post(`/api/imports/${imported.body.batchId}/reversal`, { reason: 'wrong laboratory file' })
    expect(reversed.status, JSON.stringify(reversed.body)).toBe(200)
    expect((await expectSameAsFromScratch()).find((r) => r.referralId === ids[0])?.firstHbAt).toBe(ms(600))
  })

  it('when a result is voided, made preliminary or moved to another episode, then the first Hb skips it and both episodes match', async () => {
    await exec("UPDATE results SET voided_at = NOW(), void_reason = 'test' WHERE referral_id = ? ORDER BY taken_at LIMIT 1", [ids[0]])
    // A voided value no longer counts: the first Hb is the next one (600 h ago voided, 300 h left).
    expect((await expectSameAsFromScratch()).find((r) => r.referralId === ids[0])?.firstHbAt).toBe(ms(300))
    const earliestStanding = "SELECT id FROM (SELECT id FROM results WHERE referral_id = ? AND analyte = 'hb' AND voided_at IS NULL ORDER BY taken_at LIMIT 1) e"
    await exec(`UPDATE results SET status = 'preliminary' WHERE id = (${earliestStanding})`, [ids[0]])
    expect((await expectSameAsFromScratch()).find((r) => r.referralId === ids[0])?.firstHbAt).toBe(ms(50))
    await exec(`UPDATE results SET status = 'final' WHERE id = (${earliestStanding})`, [ids[0]])
    expect((await expectSameAsFromScratch()).find((r) => r.referralId === ids[0])?.firstHbAt).toBe(ms(300))
    await exec('UPDATE results SET referral_id = ? WHERE referral_id = ? ORDER BY taken_at LIMIT 1', [ids[2], ids[0]])
    await expectSameAsFromScratch()
  })

  it('when an episode moves to clinic, then its clinic date matches', async () => {
    const detail = await nurse.get(`/api/referrals/${ids[0]}`)
    const res = await nurse.post(`/api/referrals/${ids[0]}/transitions`, { to: 'clinic', version: detail.body.version, reason: 'Anaemic' })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect((await expectSameAsFromScratch()).find((r) => r.referralId === ids[0])?.clinicAt).not.toBeNull()
    await exec("INSERT INTO stage_transitions (referral_id, from_stage, to_stage, at) VALUES (?, 'treating', 'cleared', NOW()), (?, 'cleared', 'operated', NOW())", [ids[1], ids[1]])
    await expectSameAsFromScratch()
  })

  it('when iron is prescribed and given, and a dose is taken back out, then the dose dates match', async () => {
    await exec(`INSERT INTO prescriptions (referral_id, product_code, route, weight_kg, hb_gl, target_hb_gl, deficit_mg, total_mg, first_dose_date, plan, cautions, status, prescribed_at)
      VALUES (?, 'ferric-carboxymaltose', 'iv', 70, 100, 150, 1000, 1000, CURDATE(), '{}', '{}', 'active', NOW())`, [ids[1]])
    const [rx] = await t.sequelize.query<{ id: number }>('SELECT id FROM prescriptions WHERE referral_id = ?', { type: QueryTypes.SELECT, replacements: [ids[1]] })
    await exec(`INSERT INTO administrations (prescription_id, referral_id, dose_mg, given_at, batch_number, reaction, created_at)
      VALUES (?, ?, 500, DATE_SUB(NOW(), INTERVAL 3 DAY), 'T1', 'none', NOW()), (?, ?, 500, DATE_SUB(NOW(), INTERVAL 1 DAY), 'T2', 'none', NOW())`, [rx!.id, ids[1], rx!.id, ids[1]])
    expect((await expectSameAsFromScratch()).find((r) => r.referralId === ids[1])?.prescribed).toBe(1)
    await exec('DELETE FROM administrations WHERE referral_id = ? ORDER BY given_at LIMIT 1', [ids[1]])
    await expectSameAsFromScratch()
    await exec('DELETE FROM administrations WHERE referral_id = ?', [ids[1]])
    await exec('DELETE FROM prescriptions WHERE referral_id = ?', [ids[1]])
    expect((await expectSameAsFromScratch()).find((r) => r.referralId === ids[1])?.prescribed).toBe(0)
  })
})
