import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral, patientBody } from '../helpers/pathwayFactories'
import { AuditEntry, Patient, PatientMeasurement } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

let t: TestApp
let nurse: StaffFixture
let c: Client
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  nurse = await makeStaff('nurse')
  c = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
})

const counts = async () => ({
  patients: await Patient.count(),
  measurements: await PatientMeasurement.count(),
  audit: await AuditEntry.count(),
})

describe('registering a patient', () => {
  it('when a nurse registers a patient, then 201 with the id, current height and weight, and an audit row', async () => {
    const res = await c.post('/api/patients', patientBody({ mrn: 'kv100001', heightCm: 170, weightKg: 82.5, phone: '01632 960 111' }))
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body).toMatchObject({ mrn: 'KV100001', heightCm: 170, weightKg: 82.5, sex: 'female', version: 1, phone: '01632 960 111' })
    expect(typeof res.body.id).toBe('number')
    const audit = await AuditEntry.findOne({ where: { action: 'create', entity: 'patient', entityId: String(res.body.id) }, raw: true })
    expect(audit).toMatchObject({ userId: nurse.id, patientId: res.body.id, after: { mrn: 'KV100001' } })
  })

  it('when the weight is not yet known, then the patient is registered without it', async () => {
    const res = await c.post('/api/patients', patientBody({ heightCm: undefined, weightKg: undefined }))
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ heightCm: null, weightKg: null })
    expect(await PatientMeasurement.count()).toBe(0)
  })

  it('when the MRN is already registered, then 409 and no second patient', async () => {
    await c.post('/api/patients', patientBody({ mrn: 'KV200002' })).expect(201)
    const before = await counts()
    const res = await c.post('/api/patients', patientBody({ mrn: 'kv200002' }))
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('duplicate_mrn')
    expect(await counts()).toEqual(before)
  })

  const bad: [string, Record<string, unknown>, string, RegExp][] = [
    ['a date of birth in the future', { dateOfBirth: addDays(todayIso(), 1) }, 'dateOfBirth', /future/],
    ['an impossible date of birth', { dateOfBirth: '1970-02-30' }, 'dateOfBirth', /real date/],
    ['a weight of 900 kg', { weightKg: 900 }, 'weightKg', /between 2 and 350 kg/],
    ['a height of 20 cm', { heightCm: 20 }, 'heightCm', /between 40 and 250 cm/],
    ['a sex the equations cannot use', { sex: 'x' }, 'sex', /female.*male/],
    ['a malformed e-mail', { email: 'not-an-address' }, 'email', /valid address/],
    ['no MRN', { mrn: '' }, 'mrn', /MRN/],
    ['a measurement date in the future', { measuredAt: new Date(Date.now() + 86_400_000).toISOString() }, 'measuredAt', /future/],
  ]
  for (const [what, override, field, message] of bad) {
    it(`when the form has ${what}, then 400 names ${field} and nothing is written`, async () => {
      const before = await counts()
      const res = await c.post('/api/patients', patientBody(override))
      expect(res.status).toBe(400)
      expect(res.body.error.fields[field]).toMatch(message)
      expect(await counts()).toEqual(before)
    })
  }
})

describe('reading and editing a patient', () => {
  it('when a patient record is opened, then the read is audited as a view', async () => {
    const p = (await c.post('/api/patients', patientBody()).expect(201)).body
    const res = await c.get(`/api/patients/${p.id}`).expect(200)
    expect(res.body).toMatchObject({ id: p.id, mrn: p.mrn, measurements: [{ weightKg: 68 }], referrals: [] })
    const views = await AuditEntry.findAll({ where: { action: 'view', entity: 'patient', entityId: String(p.id) }, raw: true })
    expect(views).toHaveLength(1)
    expect(views[0]).toMatchObject({ userId: nurse.id, patientId: p.id })
  })

  it('when the weight changes, then a new measurement is appended, the history is kept and the version goes up', async () => {
    const p = (await c.post('/api/patients', patientBody({ weightKg: 90 })).expect(201)).body
    const res = await c.patch(`/api/patients/${p.id}`, { version: 1, weightKg: 86 })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ weightKg: 86, heightCm: 162, version: 2 })
    const history = (await c.get(`/api/patients/${p.id}`)).body.measurements
    expect(history.map((m: { weightKg: number | null }) => m.weightKg)).toEqual([86, 90])
    const audit = await AuditEntry.findOne({ where: { action: 'update', entity: 'patient' }, raw: true })
    expect(audit).toMatchObject({ before: { weightKg: 90 }, after: { weightKg: 86 } })
  })

  it('when the same weight is sent again, then no new measurement is stored', async () => {
    const p = (await c.post('/api/patients', patientBody({ weightKg: 70 })).expect(201)).body
    await c.patch(`/api/patients/${p.id}`, { version: 1, weightKg: 70, phone: '0163 296 0000' }).expect(200)
    expect(await PatientMeasurement.count({ where: { patientId: p.id } })).toBe(1)
  })

  it('when two nurses edit the same patient, then the second (stale) edit gets 409 and changes nothing', async () => {
    const p = (await c.post('/api/patients', patientBody({ weightKg: 70 })).expect(201)).body
    await c.patch(`/api/patients/${p.id}`, { version: 1, familyName: 'Marlowe' }).expect(200)
    const before = await counts()
    const res = await c.patch(`/api/patients/${p.id}`, { version: 1, familyName: 'Other', weightKg: 75 })
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('stale_version')
    expect(await Patient.findByPk(p.id, { raw: true })).toMatchObject({ familyName: 'Marlowe', version: 2 })
    expect(await counts()).toEqual(before)
  })

  it('when an edit has an implausible weight, then 400 and nothing changes', async () => {
    const p = (await c.post('/api/patients', patientBody()).expect(201)).body
    const before = await counts()
    const res = await c.patch(`/api/patients/${p.id}`, { version: 1, weightKg: 900 })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.weightKg).toMatch(/350/)
    expect(await counts()).toEqual(before)
  })

  it('when an edit changes the MRN to one already registered, then 409', async () => {
    await c.post('/api/patients', patientBody({ mrn: 'KV300003' })).expect(201)
    const p = (await c.post('/api/patients', patientBody()).expect(201)).body
    expect((await c.patch(`/api/patients/${p.id}`, { version: 1, mrn: 'KV300003' })).status).toBe(409)
  })

  it('when the patient does not exist, then 404', async () => {
    expect((await c.get('/api/patients/999999')).status).toBe(404)
  })

  it('when a patient is searched by MRN or name prefix, then the matches are listed', async () => {
    await c.post('/api/patients', patientBody({ mrn: 'KV400004', familyName: 'Quenby' })).expect(201)
    expect((await c.get('/api/patients?q=KV4000')).body.rows).toHaveLength(1)
    expect((await c.get('/api/patients?q=quen')).body.rows[0]).toMatchObject({ familyName: 'Quenby' })
  })
})

describe('surgeons and patient records', () => {
  it("when a surgeon opens a patient on their own list, then 200; another surgeon's patient, then 403", async () => {
    const mine = await makeStaff('surgeon')
    const other = await makeStaff('surgeon')
    const proc = await makeProcedure()
    const a = await makePatient()
    const b = await makePatient()
    await makeReferral({ patientId: a.id, procedureId: proc.id, surgeonId: mine.id })
    await makeReferral({ patientId: b.id, procedureId: proc.id, surgeonId: other.id })
    const s = await new Client(t.app).mustSignIn(mine.email, mine.password)
    expect((await s.get(`/api/patients/${a.id}`)).status).toBe(200)
    expect((await s.get(`/api/patients/${b.id}`)).status).toBe(403)
  })
})
