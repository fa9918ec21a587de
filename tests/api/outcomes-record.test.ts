import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { AuditEntry, Outcome, Referral } from '../../server/models/index'
import { todayIso } from '../../shared/pathway'

let t: TestApp
let surgeon: StaffFixture
let otherSurgeon: StaffFixture
let asNurse: Client
let asSurgeon: Client
let asOtherSurgeon: Client

beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  surgeon = await makeStaff('surgeon')
  otherSurgeon = await makeStaff('surgeon')
  const n = await makeStaff('nurse')
  asNurse = await new Client(t.app).mustSignIn(n.email, n.password)
  asSurgeon = await new Client(t.app).mustSignIn(surgeon.email, surgeon.password)
  asOtherSurgeon = await new Client(t.app).mustSignIn(otherSurgeon.email, otherSurgeon.password)
})

const operated = (o: { stage?: 'operated' | 'closed' | 'cleared'; lossMl?: number } = {}) =>
  makeEpisode({ surgeonId: surgeon.id, expectedBloodLossMl: o.lossMl ?? 500, referral: { stage: o.stage ?? 'operated' } })

const body = (o: Record<string, unknown> = {}) => ({
  surgeryDate: todayIso(),
  bloodLossMl: 400,
  unitsTransfusedIntraOp: 0,
  unitsTransfusedPostOp: 1,
  unitsCrossmatched: 2,
  lowestHbGL: 92,
  dischargeHbGL: 98,
  lengthOfStayDays: 4,
  complications: ['none'],
  version: 1,
  ...o,
})

describe('POST /api/referrals/:id/outcome', () => {
  it('when the nurse records a plausible outcome, then it is saved, the version moves on and the audit row is written', async () => {
    const { referral } = await operated()
    const res = await asNurse.post(`/api/referrals/${referral.id}/outcome`, body())
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.outcome).toMatchObject({ bloodLossMl: 400, unitsCrossmatched: 2, complications: ['none'] })
    expect(res.body.warnings).toEqual([])
    expect(res.body.version).toBe(2)
    const audit = await AuditEntry.findAll({ where: { entity: 'outcome' } })
    expect(audit).toHaveLength(1)
    expect(audit[0]!.patientId).toBe(referral.patientId)
    const read = await asSurgeon.get(`/api/referrals/${referral.id}/outcome`)
    expect(read.status).toBe(200)
    expect(read.body.outcome.lowestHbGL).toBe(92)
  })

  it('when blood loss is over 3× the usual 500 mL and the lowest Hb is 55 g/L, then it is saved with both warnings', async () => {
    const { referral } = await operated({ lossMl: 500 })
    const res = await asNurse.post(
      `/api/referrals/${referral.id}/outcome`,
      body({ bloodLossMl: 1600, lowestHbGL: 55, dischargeHbGL: null }),
    )
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.warnings.map((w: { field: string }) => w.field).sort()).toEqual(['bloodLossMl', 'lowestHbGL'])
  })

  it.each([
    ['bloodLossMl', { bloodLossMl: -5 }],
    ['lowestHbGL', { lowestHbGL: 10 }],
    ['unitsCrossmatched', { unitsCrossmatched: 1.5 }],
    ['complications', { complications: ['gout'] }],
    ['complications', { complications: ['none', 'infection'] }],
    ['surgeryDate', { surgeryDate: 'yesterday' }],
  ])('when %s is out of range, then 400 names it and nothing is written', async (field, patch) => {
    const { referral } = await operated()
    const res = await asNurse.post(`/api/referrals/${referral.id}/outcome`, body(patch))
    expect(res.status).toBe(400)
    expect(
      Object.keys(res.body.error.fields).some((k) => k.startsWith(field)),
      JSON.stringify(res.body.error.fields),
    ).toBe(true)
    expect(await Outcome.count()).toBe(0)
    expect(await AuditEntry.count({ where: { entity: 'outcome' } })).toBe(0)
  })

  it('when the version is stale, then 409 and nothing is written', async () => {
    const { referral } = await operated()
    const res = await asNurse.post(`/api/referrals/${referral.id}/outcome`, body({ version: 7 }))
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('stale_version')
    expect(await Outcome.count()).toBe(0)
  })

  it('when the episode is closed, then it is read-only (422)', async () => {
    const { referral } = await operated({ stage: 'closed' })
    const res = await asNurse.post(`/api/referrals/${referral.id}/outcome`, body())
    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('closed_read_only')
  })

  it('when the episode has not reached surgery, then 422', async () => {
    const { referral } = await operated({ stage: 'cleared' })
    expect((await asNurse.post(`/api/referrals/${referral.id}/outcome`, body())).status).toBe(422)
  })

  it("when a surgeon records for another surgeon's patient, then 403; for their own, 201", async () => {
    const { referral } = await operated()
    expect((await asOtherSurgeon.post(`/api/referrals/${referral.id}/outcome`, body())).status).toBe(403)
    expect((await asSurgeon.post(`/api/referrals/${referral.id}/outcome`, body())).status).toBe(201)
  })
})

describe('POST /api/referrals/:id/follow-up', () => {
  it('when the outcome is recorded, then the follow-up is saved with an audit row, and the episode can then close', async () => {
    const { referral } = await operated()
    const first = await asNurse.post(`/api/referrals/${referral.id}/outcome`, body())
    const res = await asNurse.post(`/api/referrals/${referral.id}/follow-up`, {
      recheckHbGL: 110,
      recheckDate: todayIso(),
      ironAfterSurgery: true,
      notes: 'Oral iron for 3 months',
      version: first.body.version,
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.outcome.followUp).toMatchObject({ recheckHbGL: 110, ironAfterSurgery: true })
    expect(await AuditEntry.count({ where: { entity: 'follow-up' } })).toBe(1)
    const close = await asNurse.post(`/api/referrals/${referral.id}/transitions`, { to: 'closed', version: res.body.version })
    expect(close.status, JSON.stringify(close.body)).toBe(200)
    const late = await asNurse.post(`/api/referrals/${referral.id}/follow-up`, {
      recheckHbGL: 111,
      recheckDate: todayIso(),
      ironAfterSurgery: false,
      version: (await Referral.findByPk(referral.id))!.version,
    })
    expect(late.status).toBe(422)
  })

  it('when there is no outcome yet, then 422; when ironAfterSurgery is missing, then 400', async () => {
    const { referral } = await operated()
    expect(
      (
        await asNurse.post(`/api/referrals/${referral.id}/follow-up`, {
          recheckHbGL: 110,
          recheckDate: todayIso(),
          ironAfterSurgery: false,
          version: 1,
        })
      ).status,
    ).toBe(422)
    const bad = await asNurse.post(`/api/referrals/${referral.id}/follow-up`, { recheckHbGL: 110, recheckDate: todayIso(), version: 1 })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.error.fields)).toContain('ironAfterSurgery')
  })
})
