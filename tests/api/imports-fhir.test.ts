import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { bundle, observation, takenHoursAgo } from '../helpers/importFixtures'
import { ImportBatch, Referral, Result } from '../../server/models/index'
import { LOINC_CODES, UCUM_TO_APP_UNIT, analyteForLoinc } from '../../shared/imports'

let t: TestApp
let nurse: StaffFixture
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
  const surgeon = await makeStaff('surgeon')
  const procedureId = (await makeProcedure()).id
  const p = await makePatient({ mrn: 'FHR0001', sex: 'female' })
  referralId = (await makeReferral({ patientId: p.id, procedureId, surgeonId: surgeon.id })).id
  c = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
})

const post = (b: object, q = 'commit=true') => c.post(`/api/imports/fhir?${q}`, b)
const AT = takenHoursAgo(6)

describe('LOINC and UCUM tables', () => {
  it('then the codes named in issue #7 map to their analytes (LOINC table, from memory)', () => {
    const want: Record<string, string> = {
      '718-7': 'hb',
      '787-2': 'mcv',
      '2276-4': 'ferritin',
      '2502-3': 'tsat',
      '2498-4': 'iron',
      '3034-6': 'transferrin',
      '1988-5': 'crp',
      '2160-0': 'creatinine',
      '2132-9': 'b12',
      '2284-8': 'folate',
    }
    for (const [code, analyte] of Object.entries(want)) expect(analyteForLoinc(code)?.analyte, code).toBe(analyte)
    expect(
      LOINC_CODES.every((e) => e.longName.length > 10 && /LOINC table \(Regenstrief\)/.test(e.source) && !/from memory/.test(e.source)),
    ).toBe(true)
  })

  it('then UCUM codes, which write micro as "u", become the units typed-in results use (UCUM specification)', () => {
    expect(UCUM_TO_APP_UNIT['ug/L']).toBe('µg/L')
    expect(UCUM_TO_APP_UNIT['umol/L']).toBe('µmol/L')
    expect(UCUM_TO_APP_UNIT['g/dL']).toBe('g/dL')
    expect(UCUM_TO_APP_UNIT['mcg/L']).toBeUndefined()
  })
})

describe('importing a FHIR R4 Bundle of Observations', () => {
  it('when every entry is valid, then each is accepted and stored in one fhir batch, converted to canonical units', async () => {
    const res = await post(
      bundle([
        observation({ mrn: 'FHR0001', loinc: '718-7', value: 10.9, ucum: 'g/dL', at: AT }),
        observation({ mrn: 'FHR0001', loinc: '2276-4', value: 18, ucum: 'ug/L', at: AT }),
        observation({ mrn: 'FHR0001', loinc: '2160-0', value: 0.9, ucum: 'mg/dL', at: AT }),
      ]),
    )
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body).toMatchObject({ accepted: 3, invalid: 0, committed: true })
    expect(res.body.entries.map((e: { outcome: string }) => e.outcome)).toEqual(['accepted', 'accepted', 'accepted'])
    const hb = await Result.findOne({ where: { referralId, analyte: 'hb' }, raw: true })
    // 10.9 g/dL × 10 = 109 g/L; creatinine 0.9 mg/dL × 88.4 = 79.56 µmol/L (CKD-EPI factor, reference §10).
    expect(hb).toMatchObject({ valueCanonical: 109, source: 'fhir' })
    expect((await Result.findOne({ where: { referralId, analyte: 'creatinine' }, raw: true }))!.valueCanonical).toBeCloseTo(79.56, 2)
    expect((await ImportBatch.findByPk(res.body.batchId))!.kind).toBe('fhir')
    expect(await Referral.findByPk(referralId, { raw: true })).toMatchObject({ anaemic: 1, ironStatus: 'absolute-deficiency' })
  })

  it("when the subject is a Patient entry in the bundle, then it is matched by that Patient's identifier", async () => {
    const b = bundle([
      { resourceType: 'Patient', id: 'p1', identifier: [{ type: { coding: [{ code: 'MR' }] }, value: 'FHR0001' }] },
      observation({ subject: { reference: 'Patient/p1' }, at: AT }),
    ])
    const res = await post(b)
    expect(res.body.entries.map((e: { outcome: string }) => e.outcome)).toEqual(['skipped', 'accepted'])
  })

  it('when the bundle has invalid entries, then each reason is reported and nothing is stored', async () => {
    const res = await post(
      bundle([
        observation({ mrn: 'FHR0001', at: AT }),
        // Not a resource a results bundle carries (clinical resources such as MedicationAdministration are skipped as holding no result).
        { resourceType: 'Questionnaire', status: 'active' },
        { ...observation({ mrn: 'FHR0001', at: AT }), valueQuantity: undefined },
        observation({ mrn: 'FHR0001', loinc: '2345-7', at: AT }),
        observation({ mrn: 'FHR0001', ucum: 'mcg/L', loinc: '2276-4', at: AT }),
        observation({ mrn: 'FHR0001', status: 'preliminary', at: AT }),
      ]),
    )
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ invalid: 5, committed: false, notStored: expect.stringMatching(/5 entries are invalid/) })
    const reasons = res.body.entries.map((e: { reason?: string }) => e.reason ?? '')
    expect(reasons[1]).toMatch(/must be an Observation.*Questionnaire/)
    expect(reasons[2]).toMatch(/valueQuantity is missing/)
    expect(reasons[3]).toMatch(/LOINC code 2345-7/)
    expect(reasons[4]).toMatch(/UCUM unit mcg\/L/)
    expect(reasons[5]).toMatch(/status must be one of final, amended, corrected/)
    expect(res.body.entries[0]).toMatchObject({ index: 0, outcome: 'accepted', fullUrl: expect.stringMatching(/^urn:uuid:/) })
    expect(await Result.count()).toBe(0)
  })

  it(
    'when the user chooses to store the valid entries of a mixed bundle, then those are stored in one batch and the invalid ones ' +
      'reported',
    async () => {
      const res = await post(
        bundle([
          observation({ mrn: 'FHR0001', value: 101, at: AT }),
          observation({ mrn: 'NOSUCH', at: AT }),
          observation({ mrn: 'FHR0001', value: 1.01, at: AT }),
        ]),
        'commit=true&storeValid=true',
      )
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      expect(res.body).toMatchObject({ accepted: 1, invalid: 1, skipped: 1 })
      expect(res.body.entries[1]).toMatchObject({ outcome: 'skipped', reason: expect.stringMatching(/NOSUCH/) })
      expect(res.body.entries[2]).toMatchObject({ outcome: 'invalid', reason: expect.stringMatching(/between 20 and 250/) })
      expect(await Result.count()).toBe(1)
    },
  )

  it('when the document is not a Bundle, then 422 says so; when the query is wrong, 400 names it', async () => {
    const res = await post({ resourceType: 'Observation' })
    expect(res.status).toBe(422)
    expect(res.body.error.message).toMatch(/must be a FHIR R4 Bundle/)
    const bad = await post(bundle([observation({ mrn: 'FHR0001' })]), 'commit=maybe')
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields.commit).toMatch(/true or false/)
  })

  it('when a bundle is sent as application/fhir+json, then the raised limit of this route reads it', async () => {
    const b = bundle([observation({ mrn: 'FHR0001', at: AT })])
    const res = await c.agent
      .post('/api/imports/fhir?commit=false')
      .set('X-CSRF-Token', c.csrf)
      .set('Content-Type', 'application/fhir+json')
      .send(JSON.stringify(b))
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ accepted: 1, committed: false })
    expect(await Result.count()).toBe(0)
  })
})
