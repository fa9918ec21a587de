import { beforeEach, describe, expect, it } from 'vitest'
import type { Client } from '../helpers/agent'
import type { StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { clinicTestApp, noCautions } from '../helpers/clinicApp'
import { Administration, Prescription, Referral, StageTransition } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

const clinic = clinicTestApp()
let doctor: Client
let nurse: Client
let surgeon: StaffFixture

beforeEach(async () => {
  const staff = await clinic.reset('doctor', 'nurse', 'surgeon')
  surgeon = staff.surgeon
  doctor = await clinic.signIn(staff.doctor)
  nurse = await clinic.signIn(staff.nurse)
})

describe('dose plan preview', () => {
  it(
    'when a 45 kg patient has Hb 90 g/L, then the Ganzoni deficit is 1148 mg and ferric derisomaltose is split 900 + 200 mg a week ' +
      'apart',
    async () => {
      // Ganzoni (reference §6): 45 × (150 − 90) × 0.24 + 500 = 1148 mg. Caps: ≤20 mg/kg → 900 mg first dose.
      const { referral } = await makeEpisode({ surgeonId: surgeon.id, weightKg: 45, hb: [{ hbGL: 90 }] })
      const res = await doctor.post(`/api/referrals/${referral.id}/dose-plan`, { productCode: 'ferric-derisomaltose' })
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      expect(res.body.plan.deficitMg).toBe(1148)
      expect(res.body.plan.doses.map((d: { doseMg: number; dayOffset: number }) => [d.doseMg, d.dayOffset])).toEqual([
        [900, 0],
        [200, 7],
      ])
      expect(res.body.inputs).toMatchObject({ weightKg: 45, hbGL: 90, targetHbGL: 150 })
      expect(res.body.methods.deficit).toMatch(/Ganzoni/)
      expect(res.body.cautions.join(' ')).toMatch(/prescribing information/)
      expect(res.body.cautionQuestions).toHaveLength(4)
    },
  )

  it('when the weight was measured more than 90 days ago, then the preview warns', async () => {
    const { referral } = await makeEpisode({
      surgeonId: surgeon.id,
      weightKg: 70,
      weightMeasuredAt: new Date(Date.now() - 120 * 86_400_000),
    })
    const res = await doctor.post(`/api/referrals/${referral.id}/dose-plan`, { productCode: 'ferric-carboxymaltose' })
    expect(res.body.plan.warnings[0]).toMatch(/measured 120 days ago/)
  })

  it('when there is no weight, then 422 names it and nothing is computed from a default', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id, weightKg: null })
    const res = await doctor.post(`/api/referrals/${referral.id}/dose-plan`, { productCode: 'ferric-carboxymaltose' })
    expect(res.status).toBe(422)
    expect(res.body.error.fields.weightKg).toBeDefined()
  })

  it('when the product is oral, then the plan is an alternate-day schedule with a warning that it takes weeks', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id, weightKg: 70, hb: [{ hbGL: 115 }] })
    const res = await doctor.post(`/api/referrals/${referral.id}/dose-plan`, { productCode: 'ferrous-sulfate-oral' })
    expect(res.status).toBe(200)
    expect(res.body.plan.oralSchedule.alternateDays).toBe(true) // Stoffel 2017; BSG 2021
    expect(res.body.plan.warnings.join(' ')).toMatch(/week/i)
  })
})

describe('saving a prescription', () => {
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

  it('when a dose is over 20 mg/kg, then the server refuses naming the cap and stores nothing', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id, weightKg: 45, hb: [{ hbGL: 90 }] })
    const res = await prescribe(referral.id, { doses: [{ doseMg: 1000, dayOffset: 0 }] })
    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('dose_over_cap')
    expect(res.body.error.message).toMatch(/20 mg\/kg/)
    expect(res.body.error.fields.maxSingleDoseMgPerKg).toBeDefined()
    expect(await Prescription.count()).toBe(0)
  })

  it('when a caution is answered yes without an override reason, then IV iron is blocked; with a reason it is saved', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id, weightKg: 70, hb: [{ hbGL: 100 }] })
    const blocked = await prescribe(referral.id, { cautions: { ...noCautions, activeInfection: true } })
    expect(blocked.status).toBe(422)
    expect(blocked.body.error.code).toBe('caution_positive')
    expect(blocked.body.error.message).toMatch(/Active infection/)
    expect(await Prescription.count()).toBe(0)
    const saved = await prescribe(referral.id, {
      cautions: { ...noCautions, activeInfection: true },
      overrideReason: 'Infection treated; CRP falling; surgery cannot wait',
    })
    expect(saved.status, JSON.stringify(saved.body)).toBe(201)
    expect(saved.body.prescription.overrideReason).toMatch(/Infection treated/)
  })

  it('when a caution question is not answered, then 400 names it', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id })
    const res = await prescribe(referral.id, { cautions: { previousHypersensitivity: false } })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.error.fields).join(' ')).toMatch(/cautions\.activeInfection/)
  })

  it('when IV iron is prescribed without the checklist, then 400 names it; oral iron needs none', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id, weightKg: 70, hb: [{ hbGL: 115 }] })
    const version = (await Referral.findByPk(referral.id))!.version
    const iv = await doctor.post(`/api/referrals/${referral.id}/prescriptions`, {
      productCode: 'ferric-carboxymaltose',
      firstDoseDate: todayIso(),
      version,
    })
    expect(iv.status).toBe(400)
    expect(iv.body.error.fields.cautions).toMatch(/caution/)
    const oral = await doctor.post(`/api/referrals/${referral.id}/prescriptions`, {
      productCode: 'ferrous-sulfate-oral',
      firstDoseDate: todayIso(),
      version,
    })
    expect(oral.status, JSON.stringify(oral.body)).toBe(201)
    expect(oral.body.prescription.cautions).toBeNull()
    expect(oral.body.prescription.oralSchedule).toMatch(/alternate/i)
  })

  it('when the version is stale, then 409 and nothing is stored', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id })
    const res = await doctor.post(`/api/referrals/${referral.id}/prescriptions`, {
      productCode: 'ferric-carboxymaltose',
      firstDoseDate: todayIso(),
      cautions: noCautions,
      version: referral.version + 5,
    })
    expect(res.status).toBe(409)
    expect(await Prescription.count()).toBe(0)
  })

  it('when saved, then the episode shows treatment ordered but not given', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id, weightKg: 70, hb: [{ hbGL: 100 }] })
    expect((await prescribe(referral.id, {})).status).toBe(201)
    const detail = await doctor.get(`/api/referrals/${referral.id}`)
    expect(detail.body.flags).toContain('treatment-not-given')
  })

  it('when a surgeon tries to prescribe, then 403', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id })
    const s = await clinic.signIn(surgeon)
    const res = await s.post(`/api/referrals/${referral.id}/prescriptions`, {
      productCode: 'ferric-carboxymaltose',
      firstDoseDate: todayIso(),
      cautions: noCautions,
      version: 1,
    })
    expect(res.status).toBe(403)
  })
})

describe('recording a dose given', () => {
  async function prescribed(weightKg = 70) {
    const ep = await makeEpisode({ surgeonId: surgeon.id, weightKg, hb: [{ hbGL: 95 }] })
    const version = (await Referral.findByPk(ep.referral.id))!.version
    const res = await doctor.post(`/api/referrals/${ep.referral.id}/prescriptions`, {
      productCode: 'ferric-carboxymaltose',
      firstDoseDate: todayIso(),
      cautions: noCautions,
      version,
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    return { ...ep, prescriptionId: res.body.prescription.id as number }
  }

  it(
    'when a doctor records the infusion at clinic, then the episode moves to treating (the pathway table gives doctors clinic → ' +
      'treating) and the re-check is due 4 weeks later',
    async () => {
      const { referral, prescriptionId } = await prescribed()
      const from = (await Referral.findByPk(referral.id))!.stage
      expect(from).toBe('clinic')
      const givenAt = new Date()
      const res = await doctor.post(`/api/referrals/${referral.id}/administrations`, {
        prescriptionId,
        doseMg: 1000,
        givenAt: givenAt.toISOString(),
        batchNumber: 'B-2231',
        reaction: 'none',
      })
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      expect(res.body.stage).toBe('treating')
      // Ferinject SmPC 4.2: Hb re-assessed no earlier than 4 weeks after the last dose
      expect(res.body.recheckDueDate).toBe(addDays(givenAt.toISOString().slice(0, 10), 28))
      const r = await Referral.findByPk(referral.id)
      expect(r!.stage).toBe('treating')
      expect(await StageTransition.count({ where: { referralId: referral.id, toStage: 'treating' } })).toBe(1)
      const detail = await nurse.get(`/api/referrals/${referral.id}`)
      expect(detail.body.flags).not.toContain('treatment-not-given')
    },
  )

  it(
    'when a nurse records the infusion at clinic, then the dose is stored but the stage stays: the pathway table gives nurses no ' +
      'move to treating from clinic',
    async () => {
      const { referral, prescriptionId } = await prescribed()
      const givenAt = new Date()
      const res = await nurse.post(`/api/referrals/${referral.id}/administrations`, {
        prescriptionId,
        doseMg: 1000,
        givenAt: givenAt.toISOString(),
        batchNumber: 'B-2232',
        reaction: 'none',
      })
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      expect(res.body.stage).toBe('clinic')
      expect((await Referral.findByPk(referral.id))!.stage).toBe('clinic')
      expect(await StageTransition.count({ where: { referralId: referral.id, toStage: 'treating' } })).toBe(0)
      expect(await Administration.count({ where: { referralId: referral.id } })).toBe(1)
      // re-check 4 weeks after the last dose (clinic default, see the test above)
      expect(res.body.recheckDueDate).toBe(addDays(givenAt.toISOString().slice(0, 10), 28))
    },
  )

  it('when the dose is over the product cap, then 422 and nothing is recorded', async () => {
    const { referral, prescriptionId } = await prescribed(45)
    const res = await nurse.post(`/api/referrals/${referral.id}/administrations`, {
      prescriptionId,
      doseMg: 1000,
      givenAt: new Date().toISOString(),
      batchNumber: 'B-1',
      reaction: 'none',
    })
    expect(res.status).toBe(422)
    expect(res.body.error.message).toMatch(/20 mg\/kg \(900 mg at 45 kg\)/)
    expect(await Administration.count()).toBe(0)
  })

  it('when a second dose comes 3 days after the first, then the 7-day interval refuses it', async () => {
    const { referral, prescriptionId } = await prescribed(90)
    const first = new Date(Date.now() - 3 * 86_400_000)
    await nurse
      .post(`/api/referrals/${referral.id}/administrations`, {
        prescriptionId,
        doseMg: 500,
        givenAt: first.toISOString(),
        batchNumber: 'B-1',
        reaction: 'none',
      })
      .expect(201)
    const res = await nurse.post(`/api/referrals/${referral.id}/administrations`, {
      prescriptionId,
      doseMg: 500,
      givenAt: new Date().toISOString(),
      batchNumber: 'B-2',
      reaction: 'none',
    })
    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('interval_too_short')
  })

  it('when the time given is in the future or the batch is missing, then 400 names the field', async () => {
    const { referral, prescriptionId } = await prescribed()
    const res = await nurse.post(`/api/referrals/${referral.id}/administrations`, {
      prescriptionId,
      doseMg: 500,
      givenAt: new Date(Date.now() + 86_400_000).toISOString(),
      reaction: 'none',
    })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.givenAt).toMatch(/future/)
    expect(res.body.error.fields.batchNumber).toBeDefined()
  })
})
