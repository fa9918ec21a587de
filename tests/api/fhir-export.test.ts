import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createRequire } from 'node:module'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { loadStarterFormulary } from '../helpers/clinicFactories'
import { fullEpisode } from '../helpers/documentFixtures'
import { AuditEntry, Patient, Result } from '../../server/models/index'

// The published FHIR R4 JSON schema (hl7.org/fhir/R4/fhir.schema.json) as shipped by the
// validator package; compiled once for this file because it is large.
const require = createRequire(import.meta.url)
const JSONSchemaValidator = require('@asymmetrik/fhir-json-schema-validator') as new () => {
  validate(resource: object, verbose?: boolean): unknown[]
}
const validator = new JSONSchemaValidator()

const SYSTEM = 'https://hospital.example.test/id/mrn'
let t: TestApp
let doctor: Client
let otherSurgeon: Client
let ep: Awaited<ReturnType<typeof fullEpisode>>
// FHIR JSON read field by field in assertions, as Supertest's res.body is (typed any by Supertest too).
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- arbitrary FHIR resources in a test
type Entry = { fullUrl: string; resource: Record<string, any> }
let bundle: { resourceType: string; type: string; entry: Entry[] }
const ofType = (type: string) => bundle.entry.filter((e) => e.resource.resourceType === type).map((e) => e.resource)

beforeAll(async () => {
  t = makeTestApp({ PATIENT_ID_SYSTEM: SYSTEM })
  await cleanDatabase(t.sequelize)
  await loadStarterFormulary()
  const surgeon = await makeStaff('surgeon')
  const d = await makeStaff('doctor')
  const o = await makeStaff('surgeon')
  ep = await fullEpisode(surgeon.id)
  doctor = await new Client(t.app).mustSignIn(d.email, d.password)
  otherSurgeon = await new Client(t.app).mustSignIn(o.email, o.password)
  const res = await doctor.get(`/api/referrals/${ep.referral.id}/fhir`).expect(200)
  expect(res.headers['content-type']).toBe('application/fhir+json; charset=utf-8')
  bundle = res.body
})
afterAll(async () => {
  await t.close()
})

describe('exporting an episode as a FHIR R4 Bundle', () => {
  it('then the Bundle and every resource in it are valid against the published R4 JSON schema', () => {
    expect(bundle.resourceType).toBe('Bundle')
    expect(validator.validate(bundle)).toEqual([])
    for (const e of bundle.entry) expect(validator.validate(e.resource), e.resource.resourceType).toEqual([])
  })

  it('then the schema check is real: a resource with a status outside its value set is refused', () => {
    const broken = { ...ofType('Observation')[0], status: 'done' }
    expect(validator.validate(broken).length).toBeGreaterThan(0)
  })

  it(
    'then it is a collection of one Patient, 7 Observations, 2 MedicationAdministrations and 3 Appointments, each entry with a ' +
      'urn:uuid',
    () => {
      expect(bundle.type).toBe('collection')
      // 2 Hb + ferritin, iron, transferrin, TSAT, creatinine made by the fixture = 7 results.
      expect({
        p: ofType('Patient').length,
        o: ofType('Observation').length,
        m: ofType('MedicationAdministration').length,
        a: ofType('Appointment').length,
      }).toEqual({ p: 1, o: 7, m: 2, a: 3 })
      for (const e of bundle.entry)
        expect(e.fullUrl).toMatch(/^urn:uuid:[0-9a-f]{8}-[0-9a-f]{4}-5[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/)
    },
  )

  it('then the Patient carries the hospital number with the configured system, typed MR, and name, birth date and gender', async () => {
    const p = ofType('Patient')[0]!
    const row = (await Patient.findByPk(ep.patient.id, { raw: true }))!
    // HL7 v2 table 0203 "MR" = medical record number (from memory).
    expect(p.identifier).toEqual([
      expect.objectContaining({
        system: SYSTEM,
        value: row.mrn,
        type: expect.objectContaining({
          coding: [expect.objectContaining({ system: 'http://terminology.hl7.org/CodeSystem/v2-0203', code: 'MR' })],
        }),
      }),
    ])
    expect(p.name[0]).toMatchObject({ family: row.familyName, given: [row.givenName] })
    expect(p.birthDate).toBe(row.dateOfBirth)
    expect(p.gender).toBe('female')
  })

  it('then each Observation has its LOINC code, a UCUM quantity, the sample time, the patient as subject and status final', () => {
    const patientUrl = bundle.entry.find((e) => e.resource.resourceType === 'Patient')!.fullUrl
    const byCode = new Map(ofType('Observation').map((o) => [o.code.coding[0].code, o]))
    // LOINC (from memory, checked against laboratory catalogues): 718-7 Hb, 2276-4 ferritin, 2498-4 iron (mass),
    // 3034-6 transferrin, 2502-3 TSAT, 2160-0 creatinine (mass). UCUM codes per unitsofmeasure.org.
    const hb = ofType('Observation').filter((o) => o.code.coding[0].code === '718-7')
    expect(hb.map((o) => o.valueQuantity)).toEqual([
      { value: 104, unit: 'g/L', system: 'http://unitsofmeasure.org', code: 'g/L' },
      { value: 121, unit: 'g/L', system: 'http://unitsofmeasure.org', code: 'g/L' },
    ])
    expect(byCode.get('2276-4')!.valueQuantity).toMatchObject({ value: 12, code: 'ug/L' })
    expect(byCode.get('3034-6')!.valueQuantity).toMatchObject({ value: 3, code: 'g/L' })
    expect(byCode.get('2502-3')!.valueQuantity).toMatchObject({ value: 10.6, code: '%' })
    // 8 µmol/L ÷ 0.1791 = 44.67 µg/dL; 88.4 µmol/L ÷ 88.4 = 1 mg/dL (clinical reference unit factors).
    expect(byCode.get('2498-4')!.valueQuantity).toMatchObject({ value: 44.67, code: 'ug/dL' })
    expect(byCode.get('2160-0')!.valueQuantity).toMatchObject({ value: 1, code: 'mg/dL' })
    expect(byCode.get('2498-4')!.code.coding[0].display).toBe('Iron [Mass/volume] in Serum or Plasma')
    for (const o of ofType('Observation')) {
      expect(o.status).toBe('final')
      expect(o.subject).toEqual({ reference: patientUrl })
      expect(o.code.coding[0].system).toBe('http://loinc.org')
      expect(o.effectiveDateTime).toMatch(/^\d{4}-\d{2}-\d{2}T12:00:00\.000Z$/)
    }
    // The derived TSAT points at the iron and transferrin it was computed from.
    const sources = byCode.get('2502-3')!.derivedFrom.map((r: { reference: string }) => r.reference)
    expect(sources).toEqual([
      bundle.entry.find((e) => e.resource.code?.coding?.[0].code === '2498-4')!.fullUrl,
      bundle.entry.find((e) => e.resource.code?.coding?.[0].code === '3034-6')!.fullUrl,
    ])
  })

  it('then each iron dose is a completed MedicationAdministration with the product as text and the dose in mg', () => {
    const doses = ofType('MedicationAdministration')
    expect(doses.map((d) => [d.status, d.medicationCodeableConcept.text, d.dosage.dose])).toEqual([
      ['completed', 'Ferric carboxymaltose (IV)', { value: 1000, unit: 'mg', system: 'http://unitsofmeasure.org', code: 'mg' }],
      ['completed', 'Ferric carboxymaltose (IV)', { value: 500, unit: 'mg', system: 'http://unitsofmeasure.org', code: 'mg' }],
    ])
    for (const d of doses) expect(d.effectiveDateTime).toMatch(/T12:00:00\.000Z$/)
  })

  it(
    "then appointments map Ferrolane's states to FHIR: confirmed → booked/accepted, asked to rebook → pending/declined, cancelled → " +
      'cancelled',
    () => {
      const a = ofType('Appointment')
      expect(a.map((x) => [x.status, x.participant[0].status])).toEqual([
        ['booked', 'accepted'],
        ['pending', 'declined'],
        ['cancelled', 'declined'],
      ])
      expect(a[0]!.start).toBe(ep.appointments[0]!.startsAt.toISOString())
      expect(a[0]!.end).toBe(ep.appointments[0]!.endsAt.toISOString())
      expect(a[2]!.cancelationReason).toEqual({ text: 'Clinic closed for training' })
    },
  )

  it('then the export is audited, and the same record keeps the same urn:uuid in the next export', async () => {
    expect(await AuditEntry.count({ where: { action: 'export', entity: 'referral', entityId: String(ep.referral.id) } })).toBe(1)
    const again = await doctor.get(`/api/referrals/${ep.referral.id}/fhir`).expect(200)
    expect(again.body.entry.map((e: Entry) => e.fullUrl)).toEqual(bundle.entry.map((e) => e.fullUrl))
  })

  it("when a surgeon asks for another surgeon's patient, then 403; an unknown episode is 404", async () => {
    expect((await otherSurgeon.get(`/api/referrals/${ep.referral.id}/fhir`)).status).toBe(403)
    expect((await doctor.get('/api/referrals/999999/fhir')).status).toBe(404)
  })

  it(
    'when the episode also holds a voided and a preliminary Hb, then neither is exported; a corrected value is exported with status ' +
      'corrected',
    async () => {
      const base = {
        referralId: ep.referral.id,
        patientId: ep.referral.patientId,
        analyte: 'hb' as const,
        unitCanonical: 'g/L',
        valueReported: null,
        unitReported: null,
        enteredBy: null,
        derivedFrom: null,
        source: 'hl7',
      }
      await Result.create({
        ...base,
        valueCanonical: 71.5,
        takenAt: new Date(Date.now() - 3 * 3600_000),
        voidedAt: new Date(),
        voidReason: 'deleted by the laboratory',
      })
      await Result.create({ ...base, valueCanonical: 72.5, takenAt: new Date(Date.now() - 2 * 3600_000), status: 'preliminary' })
      const corrected = await Result.create({
        ...base,
        valueCanonical: 73.5,
        takenAt: new Date(Date.now() - 3600_000),
        status: 'corrected',
      })
      const again = (await doctor.get(`/api/referrals/${ep.referral.id}/fhir`).expect(200)).body as typeof bundle
      const obs = again.entry.filter((e) => e.resource.resourceType === 'Observation').map((e) => e.resource)
      const values = obs.map((o) => o.valueQuantity.value)
      expect(values).not.toContain(71.5)
      expect(values).not.toContain(72.5)
      expect(obs).toHaveLength(ofType('Observation').length + 1)
      expect(obs.find((o) => o.id === `observation-${corrected.id}`)).toMatchObject({ status: 'corrected', valueQuantity: { value: 73.5 } })
      await Result.destroy({ where: { id: corrected.id } })
    },
  )
})
