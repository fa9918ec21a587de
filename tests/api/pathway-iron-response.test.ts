import { beforeEach, describe, expect, it } from 'vitest'
import type { Client } from '../helpers/agent'
import type { StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { clinicTestApp, noCautions } from '../helpers/clinicApp'
import { Referral } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'
import { clinicTimeZone, setClinicTimeZone } from '../../server/services/clinicDay'

// Non-response: a rise under 10 g/L by 4 weeks after IV iron (common practice, clinical
// reference §11); falling: 5 g/L or more below the value before treatment (common practice).
const clinic = clinicTestApp()
let doctor: Client
let nurse: Client
let surgeon: StaffFixture
const daysAgo = (n: number) => new Date(Date.now() - n * 86_400_000)

beforeEach(async () => {
  const staff = await clinic.reset('doctor', 'nurse', 'surgeon')
  surgeon = staff.surgeon
  doctor = await clinic.signIn(staff.doctor)
  nurse = await clinic.signIn(staff.nurse)
})

/** An episode with a baseline Hb, 1000 mg ferric carboxymaltose given `doseDaysAgo`, through the API. */
async function treated(baselineGL: number, baselineDaysAgo: number, doseDaysAgo: number) {
  const ep = await makeEpisode({
    surgeonId: surgeon.id,
    weightKg: 70,
    hb: [{ hbGL: baselineGL, takenAt: daysAgo(baselineDaysAgo) }],
    referral: { plannedSurgeryDate: addDays(todayIso(), 30) },
  })
  const version = (await Referral.findByPk(ep.referral.id))!.version
  const rx = await doctor.post(`/api/referrals/${ep.referral.id}/prescriptions`, {
    productCode: 'ferric-carboxymaltose',
    firstDoseDate: todayIso(),
    cautions: noCautions,
    version,
  })
  expect(rx.status, JSON.stringify(rx.body)).toBe(201)
  const dose = await doctor.post(`/api/referrals/${ep.referral.id}/administrations`, {
    prescriptionId: rx.body.prescription.id,
    doseMg: 1000,
    givenAt: daysAgo(doseDaysAgo).toISOString(),
    batchNumber: 'B-7781',
    reaction: 'none',
  })
  expect(dose.status, JSON.stringify(dose.body)).toBe(201)
  return ep.referral.id
}

const hb = (referralId: number, value: number, takenDaysAgo: number) =>
  nurse
    .post(`/api/referrals/${referralId}/results`, { analyte: 'hb', value, unit: 'g/L', takenAt: daysAgo(takenDaysAgo).toISOString() })
    .expect(201)
const worklist = async (flag: string) => {
  const res = await nurse.get(`/api/worklist?flag=${flag}&pageSize=100`)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body as { total: number; rows: { id: number; flags: string[] }[] }
}

describe('worklist flags from the measured response to iron', () => {
  it(
    'when Hb rises only 4 g/L (100 → 104) five weeks after IV iron, then "no response to IV iron" is a worklist flag a nurse can ' +
      'filter and count',
    async () => {
      const id = await treated(100, 40, 35)
      expect((await worklist('no-response-to-iron')).total).toBe(0)
      await hb(id, 104, 1)
      const list = await worklist('no-response-to-iron')
      expect(list.total).toBe(1)
      expect(list.rows.map((r) => r.id)).toEqual([id])
      expect(list.rows[0]!.flags).toContain('no-response-to-iron')
      // The same rule gives the verdict's reason on the episode.
      const p = await doctor.get(`/api/referrals/${id}/projection`)
      expect(p.body.readiness.flags).toContain('no-response-to-iron')
    },
  )

  it('when Hb rises 14 g/L (100 → 114) five weeks after IV iron, then no flag is raised', async () => {
    const id = await treated(100, 40, 35)
    await hb(id, 114, 1)
    expect((await worklist('no-response-to-iron')).total).toBe(0)
    expect((await worklist('hb-falling')).total).toBe(0)
    expect((await nurse.get(`/api/referrals/${id}`)).body.flags).not.toContain('no-response-to-iron')
  })

  it(
    'when Hb falls from 120 to 112 g/L after iron, then "Hb falling after ' + 'iron" is a worklist flag, before the 4-week mark too',
    async () => {
      const id = await treated(120, 20, 15)
      await hb(id, 112, 1)
      const list = await worklist('hb-falling')
      expect(list.rows.map((r) => r.id)).toEqual([id])
      expect(list.rows[0]!.flags).toContain('hb-falling')
      // Only 15 days after the dose: too early to call non-response.
      expect(list.rows[0]!.flags).not.toContain('no-response-to-iron')
    },
  )

  it('when the dose is recorded after the low re-check, then the flag follows the dose too', async () => {
    const ep = await makeEpisode({
      surgeonId: surgeon.id,
      weightKg: 70,
      hb: [
        { hbGL: 100, takenAt: daysAgo(40) },
        { hbGL: 103, takenAt: daysAgo(2) },
      ],
      referral: { plannedSurgeryDate: addDays(todayIso(), 30) },
    })
    const version = (await Referral.findByPk(ep.referral.id))!.version
    const rx = await doctor.post(`/api/referrals/${ep.referral.id}/prescriptions`, {
      productCode: 'ferric-carboxymaltose',
      firstDoseDate: todayIso(),
      cautions: noCautions,
      version,
    })
    expect((await worklist('no-response-to-iron')).total).toBe(0)
    await doctor
      .post(`/api/referrals/${ep.referral.id}/administrations`, {
        prescriptionId: rx.body.prescription.id,
        doseMg: 1000,
        givenAt: daysAgo(33).toISOString(),
        batchNumber: 'B-7782',
        reaction: 'none',
      })
      .expect(201)
    expect((await worklist('no-response-to-iron')).rows.map((r) => r.id)).toEqual([ep.referral.id])
  })
})

describe('one "today" for the re-check date', () => {
  it(
    'when the clinic is in Auckland and a dose is given at 10:00 there (22:00 UTC the day before), then the re-check is due 28 days ' +
      'after the Auckland day',
    async () => {
      const zone = clinicTimeZone()
      setClinicTimeZone('Pacific/Auckland')
      try {
        const ep = await makeEpisode({
          surgeonId: surgeon.id,
          weightKg: 70,
          hb: [{ hbGL: 100, takenAt: daysAgo(3) }],
          referral: { plannedSurgeryDate: addDays(todayIso(), 40) },
        })
        const version = (await Referral.findByPk(ep.referral.id))!.version
        const rx = await doctor.post(`/api/referrals/${ep.referral.id}/prescriptions`, {
          productCode: 'ferric-carboxymaltose',
          firstDoseDate: todayIso(),
          cautions: noCautions,
          version,
        })
        expect(rx.status, JSON.stringify(rx.body)).toBe(201)
        // Two days ago at 22:00 UTC is 10:00 or 11:00 the next morning in Auckland (UTC+12/+13).
        const givenAt = new Date(`${addDays(new Date().toISOString().slice(0, 10), -2)}T22:00:00Z`)
        const res = await doctor.post(`/api/referrals/${ep.referral.id}/administrations`, {
          prescriptionId: rx.body.prescription.id,
          doseMg: 1000,
          givenAt: givenAt.toISOString(),
          batchNumber: 'B-7783',
          reaction: 'none',
        })
        expect(res.status, JSON.stringify(res.body)).toBe(201)
        const aucklandDay = addDays(givenAt.toISOString().slice(0, 10), 1)
        // ferric carboxymaltose product information: Hb reassessed ≥ 4 weeks after the last dose
        expect(res.body.recheckDueDate).toBe(addDays(aucklandDay, 28))
      } finally {
        setClinicTimeZone(zone)
      }
    },
  )
})
