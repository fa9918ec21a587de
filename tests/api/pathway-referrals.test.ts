import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { hoursAgo, makePatient, makeProcedure } from '../helpers/pathwayFactories'
import { AuditEntry, Procedure, Referral, StageTransition } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

let t: TestApp
let nurse: StaffFixture
let surgeon: StaffFixture
let c: Client
let patientId: number
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  nurse = await makeStaff('nurse')
  surgeon = await makeStaff('surgeon', { name: 'Ms Test Surgeon' })
  await makeProcedure({ code: 'TKR', name: 'Total knee replacement', expectedBloodLossMl: 1474 })
  patientId = (await makePatient({ sex: 'female', familyName: 'Ashdown' })).id
  c = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
})

const body = (o: Record<string, unknown> = {}) => ({
  patientId,
  procedureCode: 'TKR',
  surgeonId: surgeon.id,
  plannedSurgeryDate: addDays(todayIso(), 35),
  ...o,
})
const counts = async () => ({
  referrals: await Referral.count(),
  transitions: await StageTransition.count(),
  audit: await AuditEntry.count(),
})

describe('referring a patient', () => {
  it('when a nurse refers a patient, then 201 with stage referred, version 1 and the episode detail', async () => {
    const res = await c.post('/api/referrals', body({ priority: 'cancer', referringSource: 'Orthopaedic outpatients' }))
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body).toMatchObject({
      stage: 'referred',
      stageLabel: 'Awaiting screening',
      version: 1,
      priority: 'cancer',
      daysToSurgery: 35,
      patient: { id: patientId, familyName: 'Ashdown' },
      procedure: { code: 'TKR', expectedBloodLossMl: 1474 },
      surgeon: { id: surgeon.id, name: 'Ms Test Surgeon' },
      screening: { anaemic: null, ironStatus: null, proposedStage: null, criteria: 'surgical' },
      flags: ['no-screening-result'],
    })
    expect(res.body.timeline).toEqual([expect.objectContaining({ kind: 'transition', from: null, to: 'referred' })])
    expect(res.body.allowedMoves.map((m: { to: string }) => m.to)).toEqual(['screened', 'withdrawn'])
    expect(await AuditEntry.count({ where: { action: 'create', entity: 'referral' } })).toBe(1)
  })

  const bad: [string, Record<string, unknown>, string, RegExp][] = [
    ['a surgery date before today', { plannedSurgeryDate: addDays(todayIso(), -1) }, 'plannedSurgeryDate', /today or later/],
    ['an impossible surgery date', { plannedSurgeryDate: '2031-13-01' }, 'plannedSurgeryDate', /real date/],
    ['an unknown operation', { procedureCode: 'NOPE' }, 'procedureCode', /catalogue/],
    ['a surgeon id that is a nurse', { surgeonId: -1 }, 'surgeonId', /whole number/],
    ['an unknown priority', { priority: 'asap' }, 'priority', /routine, urgent, cancer/],
    ['no patient', { patientId: undefined }, 'patientId', /required/],
    ['a patient that does not exist', { patientId: 999999 }, 'patientId', /registered patient/],
  ]
  for (const [what, o, field, message] of bad) {
    it(`when the referral has ${what}, then 400 names ${field} and nothing is written`, async () => {
      const before = await counts()
      const res = await c.post('/api/referrals', body(o))
      expect(res.status).toBe(400)
      expect(res.body.error.fields[field]).toMatch(message)
      expect(await counts()).toEqual(before)
    })
  }

  it('when the surgeon is not an active surgeon account, then 400 names surgeonId', async () => {
    const inactive = await makeStaff('surgeon', { active: false })
    for (const id of [nurse.id, inactive.id]) {
      const res = await c.post('/api/referrals', body({ surgeonId: id }))
      expect(res.status).toBe(400)
      expect(res.body.error.fields.surgeonId).toMatch(/active surgeon/)
    }
  })

  it('when the episode is opened, then it shows latest results, the timeline newest first, and the read is audited', async () => {
    const r = (await c.post('/api/referrals', body()).expect(201)).body
    await c.post(`/api/referrals/${r.id}/results`, { analyte: 'hb', value: 112, unit: 'g/L', takenAt: hoursAgo(30) }).expect(201)
    await c.post(`/api/referrals/${r.id}/results`, { analyte: 'hb', value: 115, unit: 'g/L', takenAt: hoursAgo(2) }).expect(201)
    const res = await c.get(`/api/referrals/${r.id}`).expect(200)
    expect(res.body.latestResults.hb).toMatchObject({ value: 115, unit: 'g/L' })
    // Samples sit at the time they were taken, here before the referral was made today.
    expect(res.body.timeline.map((e: { kind: string; value?: number }) => e.value ?? e.kind)).toEqual(['transition', 115, 112])
    expect(res.body.screening).toMatchObject({ anaemic: true, severity: 'mild', latestHbGL: 115, thresholdGL: 130 })
    expect(await AuditEntry.count({ where: { action: 'view', entity: 'referral', entityId: String(r.id), userId: nurse.id } })).toBe(1)
  })

  it('when the surgery date is moved with a stale version, then 409; with the current one, then 200 and audited', async () => {
    const r = (await c.post('/api/referrals', body()).expect(201)).body
    const moved = await c.patch(`/api/referrals/${r.id}`, {
      version: 1,
      plannedSurgeryDate: addDays(todayIso(), 60),
      dateChangeReason: 'theatre-capacity',
    })
    expect(moved.status).toBe(200)
    expect(moved.body).toMatchObject({ version: 2, daysToSurgery: 60 })
    expect((await c.patch(`/api/referrals/${r.id}`, { version: 1, priority: 'urgent' })).status).toBe(409)
    expect((await Referral.findByPk(r.id))!.priority).toBe('routine')
  })

  it('when the surgery date moves, then a reason is required and every change is kept with who, when and why', async () => {
    const r = (await c.post('/api/referrals', body({ listingDate: addDays(todayIso(), -3) })).expect(201)).body
    expect(r.listingDate).toBe(addDays(todayIso(), -3))
    const first = addDays(todayIso(), 35)
    const noReason = await c.patch(`/api/referrals/${r.id}`, { version: 1, plannedSurgeryDate: addDays(todayIso(), 60) })
    expect(noReason.status).toBe(400)
    expect(Object.keys(noReason.body.error.fields)).toEqual(['dateChangeReason'])
    expect((await Referral.findByPk(r.id))!.plannedSurgeryDate).toBe(first)
    const badReason = await c.patch(`/api/referrals/${r.id}`, {
      version: 1,
      plannedSurgeryDate: addDays(todayIso(), 60),
      dateChangeReason: 'weather',
    })
    expect(badReason.status).toBe(400)
    const a = await c.patch(`/api/referrals/${r.id}`, {
      version: 1,
      plannedSurgeryDate: addDays(todayIso(), 60),
      dateChangeReason: 'anaemia',
      dateChangeNote: 'Hb 98 g/L, iron first',
    })
    expect(a.status, JSON.stringify(a.body)).toBe(200)
    const b = await c.patch(`/api/referrals/${r.id}`, {
      version: 2,
      plannedSurgeryDate: addDays(todayIso(), 70),
      dateChangeReason: 'patient-choice',
    })
    expect(b.body.dateChanges).toMatchObject([
      {
        fromDate: first,
        toDate: addDays(todayIso(), 60),
        reason: 'anaemia',
        reasonLabel: 'Postponed for anaemia',
        note: 'Hb 98 g/L, iron first',
        changedBy: { id: nurse.id },
      },
      { fromDate: addDays(todayIso(), 60), toDate: addDays(todayIso(), 70), reason: 'patient-choice' },
    ])
    // Changing something else needs no reason; a listing date in the future is refused.
    expect((await c.patch(`/api/referrals/${r.id}`, { version: 3, priority: 'urgent' })).status).toBe(200)
    const future = await c.patch(`/api/referrals/${r.id}`, { version: 4, listingDate: addDays(todayIso(), 1) })
    expect(future.status).toBe(400)
    expect(Object.keys(future.body.error.fields)).toEqual(['listingDate'])
  })

  it("when a surgeon opens another surgeon's episode, then 403", async () => {
    const r = (await c.post('/api/referrals', body()).expect(201)).body
    const other = await makeStaff('surgeon')
    const s = await new Client(t.app).mustSignIn(other.email, other.password)
    expect((await s.get(`/api/referrals/${r.id}`)).status).toBe(403)
    expect((await s.get(`/api/referrals/${r.id}/results`)).status).toBe(403)
  })
})

describe('staff picker and operations catalogue', () => {
  it('then the staff list for the referral form holds active surgeons with id and name only', async () => {
    await makeStaff('surgeon', { active: false, name: 'Gone Surgeon' })
    const res = await c.get('/api/staff?role=surgeon').expect(200)
    expect(res.body.rows).toEqual([{ id: surgeon.id, name: 'Ms Test Surgeon', role: 'surgeon' }])
    expect((await c.get('/api/staff?role=porter')).status).toBe(400)
  })

  it('then the catalogue lists each operation with its blood figures and their source', async () => {
    const res = await c.get('/api/procedures').expect(200)
    expect(res.body.rows[0]).toEqual({
      code: 'TKR',
      name: 'Total knee replacement',
      specialty: 'Orthopaedics',
      expectedBloodLossMl: 1474,
      transfusionRate: 0.1,
      usualBloodOrder: 'group-and-screen',
      usualUnits: 0,
      source: 'set locally (test)',
      active: true,
    })
  })

  it('when an admin adds and edits an operation, then it is audited; a duplicate code is 409; a retired one is hidden', async () => {
    const admin = await makeStaff('admin')
    const a = await new Client(t.app).mustSignIn(admin.email, admin.password)
    const op = {
      code: 'cabg',
      name: 'CABG (on-pump)',
      specialty: 'Cardiac',
      expectedBloodLossMl: 750,
      transfusionRate: null,
      usualBloodOrder: 'crossmatch',
      usualUnits: 2,
      source: 'from memory — set locally',
    }
    expect((await a.post('/api/procedures', op)).status).toBe(201)
    expect((await a.post('/api/procedures', op)).status).toBe(409)
    expect(
      (await a.post('/api/procedures', { ...op, code: 'X1', expectedBloodLossMl: 50000 })).body.error.fields.expectedBloodLossMl,
    ).toMatch(/30000/)
    const edited = await a.patch('/api/procedures/CABG', { active: false })
    expect(edited.status).toBe(200)
    expect((await c.get('/api/procedures')).body.rows.map((r: { code: string }) => r.code)).toEqual(['TKR'])
    expect((await c.get('/api/procedures?includeInactive=1')).body.rows).toHaveLength(2)
    expect(await AuditEntry.count({ where: { entity: 'procedure' } })).toBe(2)
    expect((await Procedure.findOne({ where: { code: 'CABG' } }))!.active).toBe(false)
    expect((await a.patch('/api/procedures/NOPE', { active: false })).status).toBe(404)
  })
})
