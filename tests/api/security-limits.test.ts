import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { csv, HEADER, takenHoursAgo, uploadCsv } from '../helpers/importFixtures'
import { ImportBatch, Prescription, Result } from '../../server/models/index'
import { LIMITS } from '../../shared/limits'
import { addDays, todayIso } from '../../shared/pathway'

// A small row limit for this file's app, so the refusal is met with a few rows (the default is LIMITS.csvRows).
let t: TestApp
let nurse: Client
let doctor: Client
let admin: Client
let referralId: number
let version: number

beforeAll(async () => {
  t = makeTestApp({ IMPORT_MAX_CSV_ROWS: '5' })
  await cleanDatabase(t.sequelize)
  const surgeon = await makeStaff('surgeon')
  const [n, d, a] = [await makeStaff('nurse'), await makeStaff('doctor'), await makeStaff('admin')]
  nurse = await new Client(t.app).mustSignIn(n.email, n.password)
  doctor = await new Client(t.app).mustSignIn(d.email, d.password)
  admin = await new Client(t.app).mustSignIn(a.email, a.password)
  const ep = await makeEpisode({ surgeonId: surgeon.id, hb: [{ hbGL: 95 }] })
  referralId = ep.referral.id
  version = ep.referral.version
})
afterAll(async () => {
  await t.close()
})

const today = todayIso()

describe('every unbounded input has a limit, named in a 400', () => {
  it(`when a prescription lists more than ${LIMITS.prescriptionDoses} doses, then 400 names doses and nothing is stored`, async () => {
    const doses = Array.from({ length: LIMITS.prescriptionDoses + 1 }, (_, i) => ({ doseMg: 100, dayOffset: i }))
    const res = await doctor.post(`/api/referrals/${referralId}/prescriptions`, {
      productCode: 'ferric-carboxymaltose',
      firstDoseDate: today,
      doses,
      version,
    })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.doses).toMatch(new RegExp(`at most ${LIMITS.prescriptionDoses} doses`))
    expect(await Prescription.count()).toBe(0)
  })

  it(`when the readiness window is longer than ${LIMITS.readinessDays} days, then 400 names the limit`, async () => {
    const res = await doctor.get(`/api/readiness?from=${today}&to=${addDays(today, LIMITS.readinessDays)}`)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(new RegExp(`limit of ${LIMITS.readinessDays} days`))
    expect(res.body.error.fields.to).toBeDefined()
    await doctor.get(`/api/readiness?from=${today}&to=${addDays(today, LIMITS.readinessDays - 1)}`).expect(200)
  })

  it(`when a report period is longer than ${LIMITS.reportDays} days, then 400 names the limit`, async () => {
    const res = await doctor.get(`/api/reports/transfusion?from=${addDays(today, -LIMITS.reportDays)}&to=${today}`)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(new RegExp(`limit of ${LIMITS.reportDays} days`))
  })

  it(`when an audit search window is longer than ${LIMITS.auditDays} days, then 400 names the limit`, async () => {
    const res = await admin.get(`/api/audit?from=${addDays(today, -LIMITS.auditDays)}&to=${today}`)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(new RegExp(`limit of ${LIMITS.auditDays} days`))
    const open = await admin.get(`/api/audit?from=2000-01-01`)
    expect(open.status).toBe(400)
  })

  it(`when the infusion-session window is longer than ${LIMITS.infusionSessionDays} days, then 400 names the limit`, async () => {
    const res = await nurse.get(`/api/infusion-sessions?from=${today}&to=${addDays(today, LIMITS.infusionSessionDays)}`)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(new RegExp(`limit of ${LIMITS.infusionSessionDays} days`))
  })

  it(`when the worklist page is past ${LIMITS.worklistPage}, then 400 names page`, async () => {
    const res = await nurse.get(`/api/worklist?page=${LIMITS.worklistPage + 1}`)
    expect(res.status).toBe(400)
    expect(res.body.error.fields.page).toMatch(new RegExp(`at most ${LIMITS.worklistPage}`))
  })

  it(`when a column mapping lists more than ${LIMITS.mappingCodes} test codes, then 400 and the mapping is not saved`, async () => {
    const codes = Object.fromEntries(Array.from({ length: LIMITS.mappingCodes + 1 }, (_, i) => [`LAB${i}`, 'hb']))
    const mapping = { columns: { mrn: 'mrn', code: 'test_code', value: 'value', unit: 'unit', takenAt: 'taken_at' }, codes }
    const res = await nurse.put('/api/imports/mappings/limits-lab', { mapping })
    expect(res.status).toBe(400)
    expect(JSON.stringify(res.body.error)).toMatch(new RegExp(`at most ${LIMITS.mappingCodes} test codes`))
    expect((await nurse.get('/api/imports/mappings/limits-lab').expect(200)).body.saved).toBe(false)
  })

  it('when a CSV has more data rows than IMPORT_MAX_CSV_ROWS, then 400 names the limit and nothing is stored', async () => {
    const rows = Array.from({ length: 6 }, (_, i) => ['NOPE' + i, 'HB', 120, 'g/L', takenHoursAgo(i + 1)])
    const resultsBefore = await Result.count()
    const res = await uploadCsv(nurse, csv([HEADER, ...rows]), { commit: true })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/more than 5 data rows/)
    expect(res.body.error.fields.file).toMatch(/at most 5 rows/)
    expect(await ImportBatch.count()).toBe(0)
    expect(await Result.count()).toBe(resultsBefore)
    // At the limit it is read.
    expect((await uploadCsv(nurse, csv([HEADER, ...rows.slice(0, 5)]))).status).toBe(200)
  })

  it(`when a FHIR Bundle has more than ${LIMITS.fhirEntries} entries, then 400 names the limit`, async () => {
    const bundle = { resourceType: 'Bundle', type: 'collection', entry: Array.from({ length: LIMITS.fhirEntries + 1 }, () => ({})) }
    const res = await nurse.agent
      .post('/api/imports/fhir?commit=true&source=limits')
      .set('X-CSRF-Token', nurse.csrf)
      .set('Content-Type', 'application/fhir+json')
      .send(JSON.stringify(bundle))
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(new RegExp(`limit of ${LIMITS.fhirEntries}`))
    expect(await ImportBatch.count()).toBe(0)
  })
})
