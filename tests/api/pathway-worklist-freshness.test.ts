import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { makeProcedure, registerThroughApi } from '../helpers/pathwayFactories'
import { csv, HEADER, takenHoursAgo, uploadCsv } from '../helpers/importFixtures'
import { addDays, todayIso } from '../../shared/pathway'

/**
 * Worklist totals are cached, and each service that writes says what it changed. Every kind of
 * write below changes a total the nurse has just read (so it is in the cache); the next read,
 * at once and well inside the cache window, must already count the change.
 */
let t: TestApp
let nurse: Client
let doctor: Client
let surgeonId: number

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  const n = await makeStaff('nurse')
  const d = await makeStaff('doctor')
  const s = await makeStaff('surgeon')
  surgeonId = s.id
  nurse = await new Client(t.app).mustSignIn(n.email, n.password)
  doctor = await new Client(t.app).mustSignIn(d.email, d.password)
  await makeProcedure({ code: 'THR' })
})
afterAll(async () => {
  await t.close()
})

const total = async (query: string) => {
  const res = await nurse.get(`/api/worklist?${query}`)
  expect(res.status).toBe(200)
  return (res.body as { total: number }).total
}

const register = (patient: Record<string, unknown>, referral: Record<string, unknown> = {}) =>
  registerThroughApi(nurse, { procedureCode: 'THR', surgeonId }, patient, referral)

describe('worklist totals right after each kind of write', () => {
  let referral: { id: number; version: number }
  let patient: { id: number; version: number; mrn: string }

  it('when a referral is registered, then the queue counts it at once', async () => {
    expect(await total('stage=referred')).toBe(0)
    const r = await register({ mrn: 'FR100001', familyName: 'Quenby' })
    referral = r.referral
    patient = r.patient
    expect(await total('stage=referred')).toBe(1)
  })

  it('when the surgery date is edited, then a date window counts it at once', async () => {
    const soon = addDays(todayIso(), 10)
    expect(await total(`from=${soon}&to=${soon}`)).toBe(0)
    const res = await nurse.patch(`/api/referrals/${referral.id}`, {
      version: referral.version,
      plannedSurgeryDate: soon,
      dateChangeReason: 'theatre-capacity',
    })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    referral.version = res.body.version
    expect(await total(`from=${soon}&to=${soon}`)).toBe(1)
  })

  it('when a result is typed in, then the screening flags count it at once', async () => {
    expect(await total('flag=no-screening-result')).toBe(1)
    expect(await total('flag=surgery-soon-anaemic')).toBe(0)
    const res = await nurse.post(`/api/referrals/${referral.id}/results`, {
      analyte: 'hb',
      value: 98,
      unit: 'g/L',
      takenAt: takenHoursAgo(2),
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(await total('flag=no-screening-result')).toBe(0)
    expect(await total('flag=surgery-soon-anaemic')).toBe(1)
  })

  it('when a referral is moved, then both queues count it at once', async () => {
    expect([await total('stage=referred'), await total('stage=screened')]).toEqual([1, 0])
    const res = await nurse.post(`/api/referrals/${referral.id}/transitions`, {
      to: 'screened',
      version: referral.version,
      reason: 'Bloods taken',
    })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    referral.version = res.body.version
    expect([await total('stage=referred'), await total('stage=screened')]).toEqual([0, 1])
  })

  it('when a patient is renamed, then a name search counts the new name at once', async () => {
    expect(await total('q=Tarrant')).toBe(0)
    const current = await nurse.get(`/api/patients/${patient.id}`)
    const res = await nurse.patch(`/api/patients/${patient.id}`, { version: current.body.version, familyName: 'Tarrant' })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(await total('q=Tarrant')).toBe(1)
  })

  it('when a laboratory file is imported and then reversed, then the screening flags follow each at once', async () => {
    const other = await register({ mrn: 'FR100002', familyName: 'Ulverston' }, { plannedSurgeryDate: addDays(todayIso(), 12) })
    expect(await total('flag=no-screening-result')).toBe(1)
    const file = csv([HEADER, ['FR100002', 'HB', 95, 'g/L', takenHoursAgo(3)]])
    const imported = await uploadCsv(doctor, file, { commit: true })
    expect(imported.status, JSON.stringify(imported.body)).toBe(201)
    expect(imported.body.accepted).toBe(1)
    expect(await total('flag=no-screening-result')).toBe(0)
    const reversed = await doctor.post(`/api/imports/${imported.body.batchId}/reversal`, { reason: 'sent to the wrong clinic' })
    expect(reversed.status, JSON.stringify(reversed.body)).toBe(200)
    expect(await total('flag=no-screening-result')).toBe(1)
    expect(other.referral.id).toBeGreaterThan(referral.id)
  })

  it('when a write is refused, then the cached total stays right', async () => {
    const before = await total('stage=screened')
    const res = await nurse.post(`/api/referrals/${referral.id}/transitions`, {
      to: 'clinic',
      version: referral.version + 5,
      reason: 'stale',
    })
    expect(res.status).toBe(409)
    expect(await total('stage=screened')).toBe(before)
  })
})
