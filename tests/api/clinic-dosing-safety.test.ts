import { beforeEach, describe, expect, it } from 'vitest'
import type { Client } from '../helpers/agent'
import type { StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { clinicTestApp, noCautions } from '../helpers/clinicApp'
import { Administration, Prescription, Referral, Result } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

const clinic = clinicTestApp()
let doctor: Client
let nurse: Client
let surgeon: StaffFixture
const yearsAgo = (n: number) => addDays(todayIso(), -Math.round(n * 365.25) - 30)

beforeEach(async () => {
  const staff = await clinic.reset('doctor', 'nurse', 'surgeon')
  surgeon = staff.surgeon
  doctor = await clinic.signIn(staff.doctor)
  nurse = await clinic.signIn(staff.nurse)
})

async function prescribe(referralId: number, body: object) {
  const version = (await Referral.findByPk(referralId))!.version
  return doctor.post(`/api/referrals/${referralId}/prescriptions`, {
    productCode: 'ferric-carboxymaltose',
    firstDoseDate: todayIso(),
    cautions: noCautions,
    version,
    ...body,
  })
}

describe('dose plans that respect size and age', () => {
  it(
    'when ferric carboxymaltose is planned, then the need comes from its product table and the preview says so (Ferinject SmPC 4.2 ' +
      'Table 1: 60 kg, Hb <100 g/L → 1500 mg)',
    async () => {
      const { referral } = await makeEpisode({ surgeonId: surgeon.id, weightKg: 60, hb: [{ hbGL: 95 }] })
      const res = await doctor.post(`/api/referrals/${referral.id}/dose-plan`, { productCode: 'ferric-carboxymaltose' })
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      expect(res.body.plan.deficitMg).toBe(1500)
      expect(res.body.plan.method.method).toBe('product-table')
      expect(res.body.methods.deficit).toMatch(/Product dosing table \(Ferinject SmPC 4\.2, Table 1/)
    },
  )

  it(
    'when an 11-year-old is planned iron sucrose, which the formulary does not mark as licensed for children, then 422 names the ' + 'age',
    async () => {
      const { referral } = await makeEpisode({
        surgeonId: surgeon.id,
        weightKg: 38,
        heightCm: 145,
        hb: [{ hbGL: 95 }],
        patient: { dateOfBirth: yearsAgo(11) },
      })
      const res = await doctor.post(`/api/referrals/${referral.id}/dose-plan`, { productCode: 'iron-sucrose' })
      expect(res.status).toBe(422)
      expect(res.body.error.code).toBe('not_licensed_for_age')
      expect(res.body.error.fields.ageYears).toMatch(/not marked as licensed at age 11/)
    },
  )

  it(
    'when an 11-year-old of 38 kg is planned ferric carboxymaltose (licensed from 1 year), then the paediatric 15 mg/kg cap limits ' +
      'each dose',
    async () => {
      const { referral } = await makeEpisode({
        surgeonId: surgeon.id,
        weightKg: 38,
        heightCm: 145,
        hb: [{ hbGL: 95 }],
        patient: { dateOfBirth: yearsAgo(11) },
      })
      const res = await doctor.post(`/api/referrals/${referral.id}/dose-plan`, { productCode: 'ferric-carboxymaltose' })
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      expect(res.body.plan.paediatric).toBe(true)
      expect(res.body.plan.appliedCaps.perDoseLimitMg).toBe(500) // 15 mg/kg × 38 kg = 570, down to the 100 mg step
      expect(res.body.methods.caps).toMatch(/paediatric caps applied/)
    },
  )

  it(
    'when a 150 kg woman of 165 cm is planned ferric derisomaltose, then ' + 'Ganzoni uses ideal body weight and the method says so',
    async () => {
      const { referral } = await makeEpisode({ surgeonId: surgeon.id, weightKg: 150, heightCm: 165, hb: [{ hbGL: 100 }] })
      const res = await doctor.post(`/api/referrals/${referral.id}/dose-plan`, { productCode: 'ferric-derisomaltose' })
      expect(res.body.plan.method.weightBasis).toBe('ideal')
      expect(res.body.methods.deficit).toMatch(/ideal weight/)
    },
  )
})

describe('doses and the surgery date', () => {
  it('when surgery is 5 days away, then the preview leaves later doses out with a warning and cautions that it is too late', async () => {
    const { referral } = await makeEpisode({
      surgeonId: surgeon.id,
      weightKg: 70,
      hb: [{ hbGL: 90 }],
      referral: { plannedSurgeryDate: addDays(todayIso(), 5) },
    })
    const res = await doctor.post(`/api/referrals/${referral.id}/dose-plan`, { productCode: 'iron-sucrose' })
    expect(res.status).toBe(200)
    const surgery = addDays(todayIso(), 5)
    expect(res.body.plan.doses.every((d: { date: string }) => d.date < surgery)).toBe(true)
    expect(res.body.plan.warnings.join(' ')).toMatch(/Not planned before surgery/)
    expect(res.body.plan.warnings.join(' ')).toMatch(/too late to raise Hb before surgery; consider post-operative iron/)
  })

  it('when a prescription puts a dose after the planned surgery, then 422 names the surgery date and nothing is stored', async () => {
    const { referral } = await makeEpisode({
      surgeonId: surgeon.id,
      weightKg: 70,
      hb: [{ hbGL: 90 }],
      referral: { plannedSurgeryDate: addDays(todayIso(), 5) },
    })
    const res = await prescribe(referral.id, {
      doses: [
        { doseMg: 1000, dayOffset: 0 },
        { doseMg: 500, dayOffset: 7 },
      ],
    })
    expect(res.status).toBe(422)
    expect(res.body.error.fields.surgeryDate).toMatch(/on or after the planned surgery/)
    expect(await Prescription.count()).toBe(0)
  })

  it('when surgery is 8 weeks away, then the preview offers oral iron first, citing NICE NG24', async () => {
    const { referral } = await makeEpisode({
      surgeonId: surgeon.id,
      weightKg: 70,
      hb: [{ hbGL: 100 }],
      referral: { plannedSurgeryDate: addDays(todayIso(), 56) },
    })
    const res = await doctor.post(`/api/referrals/${referral.id}/dose-plan`, { productCode: 'ferric-carboxymaltose' })
    expect(res.body.plan.timing.oralFirstOffered).toBe(true)
    expect(res.body.plan.warnings.join(' ')).toMatch(/oral iron first.*NICE NG24/)
  })
})

describe('recording a dose re-checks the caps and the prescribed total', () => {
  async function prescribed(productCode: string, weightKg = 70, hbGL = 95) {
    const ep = await makeEpisode({ surgeonId: surgeon.id, weightKg, hb: [{ hbGL }] })
    const res = await prescribe(ep.referral.id, { productCode })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    return { ...ep, prescriptionId: res.body.prescription.id as number, totalMg: res.body.prescription.totalMg as number }
  }
  const give = (referralId: number, body: object) =>
    nurse.post(`/api/referrals/${referralId}/administrations`, {
      batchNumber: 'B-1',
      reaction: 'none',
      givenAt: new Date().toISOString(),
      ...body,
    })

  it(
    'when a dose would pass the prescribed total, then 422 names the prescribed total; with a recorded reason it is saved with the ' +
      'reason',
    async () => {
      // 70 kg, Hb 135 g/L: product table → 1500 mg (Ferinject SmPC 4.2 Table 1).
      const { referral, prescriptionId, totalMg } = await prescribed('ferric-carboxymaltose', 70, 135)
      expect(totalMg).toBe(1500)
      await give(referral.id, { prescriptionId, doseMg: 1000, givenAt: new Date(Date.now() - 8 * 86_400_000).toISOString() }).expect(201)
      const over = await give(referral.id, { prescriptionId, doseMg: 1000 })
      expect(over.status).toBe(422)
      expect(over.body.error.fields.prescribedTotal).toMatch(/2000 mg, over the prescribed total of 1500 mg/)
      expect(over.body.error.fields.overrideReason).toBeDefined()
      expect(await Administration.count()).toBe(1)
      const ok = await give(referral.id, { prescriptionId, doseMg: 1000, overrideReason: 'Ongoing bleeding; haematology agreed' })
      expect(ok.status, JSON.stringify(ok.body)).toBe(201)
      expect(ok.body.administration.overrideReason).toMatch(/haematology agreed/)
    },
  )

  it('when a fourth 200 mg iron sucrose dose would make 800 mg in 7 days, then 422 names the weekly maximum', async () => {
    const { referral, prescriptionId } = await prescribed('iron-sucrose', 70, 90)
    for (const daysAgo of [6, 4, 2]) {
      await give(referral.id, { prescriptionId, doseMg: 200, givenAt: new Date(Date.now() - daysAgo * 86_400_000).toISOString() }).expect(
        201,
      )
    }
    const res = await give(referral.id, { prescriptionId, doseMg: 200 })
    expect(res.status).toBe(422)
    expect(res.body.error.fields.maxWeeklyMg).toMatch(/800 mg within 7 days is over the weekly maximum of 600 mg/)
  })

  it(
    'when 900 mg ferric carboxymaltose is recorded for a 40 kg patient, then 422 names the 20 mg/kg cap (800 mg; Ferinject SmPC ' +
      '4.2) and nothing is stored',
    async () => {
      const { referral, prescriptionId } = await prescribed('ferric-carboxymaltose', 40, 95)
      const res = await give(referral.id, { prescriptionId, doseMg: 900 })
      expect(res.status, JSON.stringify(res.body)).toBe(422)
      expect(res.body.error.fields.maxSingleDoseMgPerKg).toMatch(/over 20 mg\/kg \(800 mg at 40 kg\)/)
      expect(await Administration.count()).toBe(0)
    },
  )

  it(
    'when a dose is entered late, dated 3 days before a dose already on ' + 'file, then 422 names the interval to that later dose',
    async () => {
      const { referral, prescriptionId } = await prescribed('ferric-carboxymaltose', 70, 95)
      const now = Date.now()
      await give(referral.id, { prescriptionId, doseMg: 500, givenAt: new Date(now - 2 * 86_400_000).toISOString() }).expect(201)
      const res = await give(referral.id, { prescriptionId, doseMg: 500, givenAt: new Date(now - 5 * 86_400_000).toISOString() })
      expect(res.status, JSON.stringify(res.body)).toBe(422)
      expect(res.body.error.fields.minIntervalDays).toMatch(/nearest dose after this one is 3 days away/)
      expect(await Administration.count()).toBe(1)
    },
  )

  it(
    'when a repeat ferric carboxymaltose course is prescribed, then a serum phosphate is asked for first; once recorded, the course ' +
      'is saved',
    async () => {
      const { referral, prescriptionId, patient } = await prescribed('ferric-carboxymaltose', 70, 95)
      const givenAt = new Date(Date.now() - 40 * 86_400_000)
      await Administration.create({
        prescriptionId,
        referralId: referral.id,
        doseMg: 1000,
        givenAt,
        batchNumber: 'B-0',
        reaction: 'none',
        reactionNotes: null,
        givenBy: null,
      })
      const refused = await prescribe(referral.id, {})
      expect(refused.status).toBe(422)
      expect(refused.body.error.code).toBe('phosphate_required')
      expect(refused.body.error.message).toMatch(/Ferinject SmPC 4\.4; MHRA Drug Safety Update 2020/)
      // A voided or a preliminary phosphate is not the laboratory's final word: still refused.
      const phosphate = {
        referralId: referral.id,
        patientId: patient.id,
        analyte: 'phosphate' as const,
        unitCanonical: 'mmol/L',
        valueReported: null,
        unitReported: null,
        enteredBy: null,
        derivedFrom: null,
        source: 'hl7',
      }
      await Result.create({
        ...phosphate,
        valueCanonical: 0.8,
        takenAt: new Date(Date.now() - 2 * 86_400_000),
        voidedAt: new Date(),
        voidReason: 'deleted by the laboratory',
      })
      await Result.create({ ...phosphate, valueCanonical: 0.85, takenAt: new Date(Date.now() - 3 * 86_400_000), status: 'preliminary' })
      expect((await prescribe(referral.id, {})).body.error?.code).toBe('phosphate_required')
      await Result.create({
        referralId: referral.id,
        patientId: patient.id,
        analyte: 'phosphate',
        valueCanonical: 0.9,
        unitCanonical: 'mmol/L',
        valueReported: 0.9,
        unitReported: 'mmol/L',
        takenAt: new Date(Date.now() - 86_400_000),
        enteredBy: null,
        derivedFrom: null,
      })
      const saved = await prescribe(referral.id, {})
      expect(saved.status, JSON.stringify(saved.body)).toBe(201)
    },
  )
})
