import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { AuditEntry, Outcome, Patient, Referral, StageTransition } from '../../server/models/index'
import { loadDemoScenario } from '../../seed/load'
import { todayIso } from '../../shared/pathway'

// The rule (#8): the post-operative record, "then the follow-up … before closed".
let t: TestApp
let surgeon: StaffFixture
let asNurse: Client
let asDoctor: Client

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  surgeon = await makeStaff('surgeon')
  const nurse = await makeStaff('nurse')
  const doctor = await makeStaff('doctor')
  asNurse = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
  asDoctor = await new Client(t.app).mustSignIn(doctor.email, doctor.password)
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await Outcome.destroy({ where: {} })
  await StageTransition.destroy({ where: {} })
  await Referral.destroy({ where: {} })
})

const episodeAt = async (stage: 'operated' | 'withdrawn' | 'deferred') =>
  (await makeEpisode({ surgeonId: surgeon.id, referral: { stage } })).referral
const close = (id: number, version: number) => asNurse.post(`/api/referrals/${id}/transitions`, { to: 'closed', version })
const outcome = {
  surgeryDate: todayIso(),
  bloodLossMl: 400,
  unitsTransfusedIntraOp: 0,
  unitsTransfusedPostOp: 0,
  unitsCrossmatched: 0,
  lowestHbGL: 101,
  dischargeHbGL: 104,
  lengthOfStayDays: 3,
  complications: ['none'],
}

async function unchanged(id: number) {
  const r = (await Referral.findByPk(id))!
  expect(r.stage).toBe('operated')
  expect(await StageTransition.count({ where: { referralId: id, toStage: 'closed' } })).toBe(0)
  expect(await AuditEntry.count({ where: { entity: 'referral', entityId: String(id), action: 'transition' } })).toBe(0)
}

describe('closing an episode after surgery', () => {
  it('when nothing after surgery is recorded, then 422 names the post-operative record and the follow-up, and nothing moves', async () => {
    const r = await episodeAt('operated')
    const res = await close(r.id, 1)
    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('follow_up_required')
    expect(res.body.error.message).toMatch(/post-operative outcome/)
    expect(res.body.error.message).toMatch(/follow-up/)
    await unchanged(r.id)
  })

  it('when only the post-operative record is in, then 422 names the follow-up; once it is recorded, the episode closes', async () => {
    const r = await episodeAt('operated')
    const rec = await asNurse.post(`/api/referrals/${r.id}/outcome`, { ...outcome, version: 1 })
    expect(rec.status, JSON.stringify(rec.body)).toBe(201)
    const refused = await close(r.id, rec.body.version)
    expect(refused.status).toBe(422)
    expect(refused.body.error).toMatchObject({ code: 'follow_up_required', fields: { followUp: 'is not recorded yet' } })
    expect(refused.body.error.message).toMatch(/follow-up after discharge/)
    await unchanged(r.id)
    const fu = await asNurse.post(`/api/referrals/${r.id}/follow-up`, {
      recheckHbGL: 115,
      recheckDate: todayIso(),
      ironAfterSurgery: false,
      version: rec.body.version,
    })
    expect(fu.status, JSON.stringify(fu.body)).toBe(201)
    const closed = await asDoctor.post(`/api/referrals/${r.id}/transitions`, { to: 'closed', version: fu.body.version })
    expect(closed.status, JSON.stringify(closed.body)).toBe(200)
    expect(closed.body).toMatchObject({ stage: 'closed', readOnly: true })
  })

  it('when an episode left the pathway (withdrawn, or deferred then withdrawn), then it closes with no post-operative record', async () => {
    const w = await episodeAt('withdrawn')
    expect((await close(w.id, 1)).status).toBe(200)
    const d = await episodeAt('deferred')
    expect(
      (
        await asNurse.post(`/api/referrals/${d.id}/transitions`, {
          to: 'withdrawn',
          version: 1,
          reason: 'Operation cancelled by the patient',
        })
      ).status,
    ).toBe(200)
    expect((await close(d.id, 2)).status).toBe(200)
    expect(await Outcome.count()).toBe(0)
  })

  it('when the outcome is read, then the read is in the audit trail with the patient', async () => {
    const r = await episodeAt('operated')
    await asNurse.post(`/api/referrals/${r.id}/outcome`, { ...outcome, version: 1 }).expect(201)
    expect((await asDoctor.get(`/api/referrals/${r.id}/outcome`)).status).toBe(200)
    expect(await AuditEntry.count({ where: { action: 'view', entity: 'outcome', patientId: r.patientId } })).toBe(1)
  })
})

describe('the demo scenario after surgery', () => {
  it(
    'then every closed demo episode that had surgery carries its ' + 'post-operative record and follow-up, dated before the close',
    async () => {
      await cleanDatabase(t.sequelize)
      expect(await loadDemoScenario(t.sequelize)).toBe(true)
      const closedAfterSurgery = await Referral.findAll({ where: { stage: 'closed' }, include: [{ model: Patient, as: 'patient' }] })
      let checked = 0
      for (const r of closedAfterSurgery) {
        if (!(await StageTransition.findOne({ where: { referralId: r.id, toStage: 'operated' } }))) continue
        const o = await Outcome.findOne({ where: { referralId: r.id } })
        const closedAt = (await StageTransition.findOne({ where: { referralId: r.id, toStage: 'closed' } }))!.at
        expect(o?.followUpAt, `demo episode ${r.id}`).toBeInstanceOf(Date)
        expect(o!.followUpAt!.getTime()).toBeLessThanOrEqual(closedAt.getTime())
        expect(o!.followUpRecheckDate! >= o!.surgeryDate).toBe(true)
        checked++
      }
      expect(checked).toBe(3)
      await cleanDatabase(t.sequelize)
    },
  )
})
