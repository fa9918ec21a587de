import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { AuditEntry } from '../../server/models/index'
import { parseCsv } from './reports-fixture'

let t: TestApp
let nurse: StaffFixture
let asAdmin: Client
let asNurse: Client
let asDoctor: Client
let patientId: number
let mrn: string
let entryId: number

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  const surgeon = await makeStaff('surgeon')
  nurse = await makeStaff('nurse', { name: 'Nurse Audit' })
  const admin = await makeStaff('admin')
  const doctor = await makeStaff('doctor')
  asAdmin = await new Client(t.app).mustSignIn(admin.email, admin.password)
  asNurse = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
  asDoctor = await new Client(t.app).mustSignIn(doctor.email, doctor.password)
  const { patient } = await makeEpisode({ surgeonId: surgeon.id })
  patientId = patient.id
  mrn = patient.mrn
  // The nurse opens the patient's record: read access to clinical data is audited.
  expect((await asNurse.get(`/api/patients/${patientId}`)).status).toBe(200)
  entryId = Number((await AuditEntry.findOne({ where: { userId: nurse.id, action: 'view', patientId } }))!.id)
})
afterAll(async () => {
  await t.close()
})

describe('GET /api/audit', () => {
  it("when the admin searches by user, patient and action, then the nurse's view of the record is listed with who and when", async () => {
    const res = await asAdmin.get(`/api/audit?userId=${nurse.id}&patientId=${patientId}&action=view`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ total: 1, page: 1, pageSize: 50 })
    expect(res.body.rows[0]).toMatchObject({
      id: entryId,
      user: { id: nurse.id, name: 'Nurse Audit' },
      action: 'view',
      entity: 'patient',
      patientId,
    })
    expect(Object.keys(res.body.rows[0]).sort()).toEqual([
      'action',
      'after',
      'at',
      'before',
      'entity',
      'entityId',
      'id',
      'patientId',
      'requestId',
      'user',
    ])
  })

  it('when the admin filters by MRN, then the entries about that patient are found without the admin reading the record', async () => {
    await asAdmin.get(`/api/patients/${patientId}`).expect(403)
    const res = await asAdmin.get(`/api/audit?mrn=${encodeURIComponent(mrn)}&action=view&entity=patient`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.rows.map((r: { id: number }) => r.id)).toContain(entryId)
    expect(res.body.rows.every((r: { patientId: number }) => r.patientId === patientId)).toBe(true)
    const none = await asAdmin.get('/api/audit?mrn=NO-SUCH-MRN').expect(200)
    expect(none.body.total).toBe(0)
    const long = await asAdmin.get(`/api/audit?mrn=${'X'.repeat(41)}`)
    expect(long.status).toBe(400)
    expect(long.body.error.fields.mrn).toMatch(/at most 40/)
  })

  it('when the admin reads the trail, then that reading is itself recorded', async () => {
    const before = await AuditEntry.count({ where: { entity: 'audit-trail' } })
    await asAdmin.get('/api/audit?entity=patient')
    expect(await AuditEntry.count({ where: { entity: 'audit-trail' } })).toBe(before + 1)
  })

  it('when filtered to a day with no entries, then none; when a date is malformed, then 400', async () => {
    expect((await asAdmin.get('/api/audit?from=2001-01-01&to=2001-01-02')).body.total).toBe(0)
    expect((await asAdmin.get('/api/audit?from=yesterday')).status).toBe(400)
  })

  it('when exported as CSV, then the rows parse and match the JSON', async () => {
    const json = (await asAdmin.get(`/api/audit?patientId=${patientId}`)).body
    const res = await asAdmin.get(`/api/audit?patientId=${patientId}&format=csv`)
    expect(res.headers['content-type']).toMatch(/^text\/csv/)
    expect(res.headers['content-disposition']).toMatch(/^attachment/)
    const rows = parseCsv(res.text)
    expect(rows.map((r) => Number(r.id))).toEqual(json.rows.map((r: { id: number }) => r.id))
    expect(rows[0]!.userName).toBe(json.rows[0].user?.name ?? '')
  })

  it('when a doctor or nurse asks for the trail, then 403', async () => {
    expect((await asDoctor.get('/api/audit')).status).toBe(403)
    expect((await asNurse.get('/api/audit')).status).toBe(403)
  })
})

describe('the audit trail cannot be changed through the application', () => {
  it('when any caller tries PUT, PATCH or DELETE on /api/audit or an entry, then 404/405 and the entry is unchanged', async () => {
    const original = (await AuditEntry.findByPk(entryId, { raw: true }))!
    for (const c of [asAdmin, asNurse, asDoctor]) {
      for (const path of ['/api/audit', `/api/audit/${entryId}`]) {
        const tries = {
          PUT: await c.put(path, { action: 'edited' }),
          PATCH: await c.patch(path, { action: 'edited' }),
          DELETE: await c.delete(path),
        }
        for (const [method, res] of Object.entries(tries)) expect([404, 405], `${method} ${path}`).toContain(res.status)
      }
    }
    expect(await AuditEntry.findByPk(entryId, { raw: true })).toEqual(original)
  })

  it('when the mounted routes are listed, then none writes to the audit trail', () => {
    const writes = t.routes.filter((r) => r.path.startsWith('/api/audit') && r.method !== 'GET')
    expect(writes).toEqual([])
  })
})
