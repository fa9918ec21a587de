import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { AuditEntry, Outcome } from '../../server/models/index'
import { todayIso } from '../../shared/pathway'

// Issue #8: "Viewing a patient's record is logged too (read access to clinical data is audited)".
let t: TestApp
let doctor: StaffFixture
let asDoctor: Client
let ids: { referralId: number; patientId: number }

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  const surgeon = await makeStaff('surgeon')
  doctor = await makeStaff('doctor')
  asDoctor = await new Client(t.app).mustSignIn(doctor.email, doctor.password)
  const { patient, referral } = await makeEpisode({ surgeonId: surgeon.id, referral: { stage: 'operated' } })
  ids = { referralId: referral.id, patientId: patient.id }
  await Outcome.create({
    referralId: referral.id,
    surgeryDate: todayIso(),
    bloodLossMl: 300,
    unitsTransfusedIntraOp: 0,
    unitsTransfusedPostOp: 0,
    unitsCrossmatched: 0,
    lowestHbGL: 100,
    dischargeHbGL: null,
    lengthOfStayDays: 2,
    complications: ['none'],
    recordedBy: null,
  })
})
afterAll(async () => {
  await t.close()
})

describe('opening clinical data leaves a "view" entry naming the reader and the patient', () => {
  it.each([
    ['the episode', () => `/api/referrals/${ids.referralId}`, 'referral'],
    ['the patient', () => `/api/patients/${ids.patientId}`, 'patient'],
    ['the results', () => `/api/referrals/${ids.referralId}/results`, 'results'],
    ['the post-operative record', () => `/api/referrals/${ids.referralId}/outcome`, 'outcome'],
    ['the clinic reviews', () => `/api/referrals/${ids.referralId}/reviews`, 'clinic-reviews'],
    ['the prescriptions', () => `/api/referrals/${ids.referralId}/prescriptions`, 'prescriptions'],
    ['the iron doses given', () => `/api/referrals/${ids.referralId}/administrations`, 'administrations'],
    ['the projection', () => `/api/referrals/${ids.referralId}/projection`, 'projection'],
    ['the surgeon readiness answers', () => `/api/referrals/${ids.referralId}/readiness`, 'readiness-reviews'],
    ['the appointments', () => `/api/referrals/${ids.referralId}/appointments`, 'appointments'],
  ])('when a doctor opens %s, then one view entry is written', async (_what, path, entity) => {
    const before = await AuditEntry.count({ where: { action: 'view', entity, userId: doctor.id, patientId: ids.patientId } })
    const res = await asDoctor.get(path())
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(await AuditEntry.count({ where: { action: 'view', entity, userId: doctor.id, patientId: ids.patientId } })).toBe(before + 1)
  })

  it('when a read is refused (no such episode), then nothing is logged as viewed', async () => {
    const before = await AuditEntry.count({ where: { action: 'view' } })
    expect((await asDoctor.get('/api/referrals/999999/outcome')).status).toBe(404)
    expect(await AuditEntry.count({ where: { action: 'view' } })).toBe(before)
  })
})
