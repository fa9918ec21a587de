import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { loadStarterFormulary } from '../helpers/clinicFactories'
import { fullEpisode } from '../helpers/documentFixtures'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { Result } from '../../server/models/index'
import { LOINC } from '../../shared/fhir/loinc'
import { LOINC_CODES } from '../../shared/imports'

const SYSTEM = 'https://hospital.example.test/id/mrn'
let t: TestApp
let nurse: Client
let ep: Awaited<ReturnType<typeof fullEpisode>>
// FHIR JSON read field by field in assertions, as Supertest's res.body is (typed any by Supertest too).
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- arbitrary FHIR resources in a test
type Entry = { fullUrl: string; resource: Record<string, any> }
let exported: { resourceType: string; entry: Entry[] }
let otherReferralId: number

beforeAll(async () => {
  t = makeTestApp({ PATIENT_ID_SYSTEM: SYSTEM })
  await cleanDatabase(t.sequelize)
  await loadStarterFormulary()
  const surgeon = await makeStaff('surgeon')
  const n = await makeStaff('nurse')
  ep = await fullEpisode(surgeon.id)
  // A TIBC whose µg/dL export does not convert back to exactly the same µmol/L:
  // 40.014 / 0.1791 = 223.42 µg/dL (2 decimals), × 0.1791 = 40.015 µmol/L (shared/clinical/units.ts factor).
  await Result.create({
    referralId: ep.referral.id,
    patientId: ep.patient.id,
    analyte: 'tibc',
    takenAt: ep.ferritin.takenAt,
    valueCanonical: 40.014,
    unitCanonical: 'µmol/L',
    valueReported: 40.014,
    unitReported: 'µmol/L',
    enteredBy: null,
    derivedFrom: null,
  })
  const other = await makePatient({ mrn: 'RTP0002', sex: 'female', dateOfBirth: ep.patient.dateOfBirth })
  otherReferralId = (await makeReferral({ patientId: other.id, procedureId: (await makeProcedure()).id, surgeonId: surgeon.id })).id
  nurse = await new Client(t.app).mustSignIn(n.email, n.password)
  exported = (await nurse.get(`/api/referrals/${ep.referral.id}/fhir`).expect(200)).body
})
afterAll(async () => {
  await t.close()
})

const importBundle = (b: object, q = 'commit=true') => nurse.post(`/api/imports/fhir?${q}`, b)

describe('one LOINC table for export and import', () => {
  it('then every code the export writes for a stored analyte is one the import reads, with the same meaning', () => {
    for (const [analyte, e] of Object.entries(LOINC)) {
      if (analyte === 'egfr') continue
      expect(
        LOINC_CODES.find((c) => c.code === e.code),
        e.code,
      ).toMatchObject({ analyte, longName: e.display })
    }
  })
})

describe('an exported episode Bundle imported again', () => {
  it(
    'when it goes back into the same patient, then every Observation is already stored, the other resources are skipped as no ' +
      'result, and nothing is added',
    async () => {
      const before = await Result.count()
      const res = await importBundle(exported)
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      const observations = exported.entry.map((e, i) => [i, e.resource.resourceType] as const).filter(([, type]) => type === 'Observation')
      // 2 Hb, ferritin, iron, transferrin, TSAT, creatinine (the fixture) and the TIBC added above.
      expect(observations).toHaveLength(8)
      expect(res.body).toMatchObject({ committed: false, accepted: 0, invalid: 0, skipped: exported.entry.length })
      for (const [i] of observations)
        expect(res.body.entries[i], `entry ${i}`).toMatchObject({
          outcome: 'skipped',
          reason: expect.stringMatching(/is already stored for /),
        })
      const others = res.body.entries.filter((_: unknown, i: number) => exported.entry[i]!.resource.resourceType !== 'Observation')
      expect(others.map((e: { reason: string }) => e.reason)).toEqual(
        expect.arrayContaining([
          'Patient resource: identifies the patient, holds no result',
          'MedicationAdministration resource: holds no laboratory result, not imported',
          'Appointment resource: holds no laboratory result, not imported',
        ]),
      )
      expect(await Result.count()).toBe(before)
    },
  )

  it(
    "when it goes into another patient's open episode, then each value is stored back in Ferrolane's units (iron 44.67 µg/dL → 8 " +
      'µmol/L, TIBC in µg/dL, creatinine 1 mg/dL → 88.4 µmol/L)',
    async () => {
      const moved = structuredClone(exported)
      const patient = moved.entry.find((e) => e.resource.resourceType === 'Patient')!.resource
      patient.identifier = [
        { system: SYSTEM, value: 'RTP0002', type: { coding: [{ system: 'http://terminology.hl7.org/CodeSystem/v2-0203', code: 'MR' }] } },
      ]
      const res = await importBundle(moved)
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      expect(res.body).toMatchObject({ committed: true, accepted: 8, invalid: 0 })
      const stored = await Result.findAll({ where: { referralId: otherReferralId, source: 'fhir' }, raw: true })
      const canonical = (a: string) => stored.filter((r) => r.analyte === a).map((r) => r.valueCanonical)
      // Conversions: iron µg/dL × 0.1791, creatinine mg/dL × 88.4 (shared/clinical/units.ts), stored to 3 decimals.
      expect(canonical('iron')).toEqual([8])
      expect(canonical('creatinine')).toEqual([88.4])
      expect(canonical('tibc')).toEqual([40.015])
      expect(stored.find((r) => r.analyte === 'tibc')).toMatchObject({ valueReported: 223.42, unitReported: 'µg/dL' })
      expect(canonical('hb').sort()).toEqual([104, 121])
    },
  )

  it(
    'when the same moved Bundle comes again, then the converted values count as already stored (within the export rounding), not as ' +
      'new results',
    async () => {
      const moved = structuredClone(exported)
      moved.entry.find((e) => e.resource.resourceType === 'Patient')!.resource.identifier = [{ system: SYSTEM, value: 'RTP0002' }]
      const before = await Result.count()
      const res = await importBundle(moved)
      expect(res.body).toMatchObject({ accepted: 0, invalid: 0 })
      expect(await Result.count()).toBe(before)
    },
  )
})
