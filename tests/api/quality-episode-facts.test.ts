import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { QueryTypes } from 'sequelize'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { loadStarterFormulary, makeEpisode } from '../helpers/clinicFactories'
import { noCautions } from '../helpers/clinicApp'
import { csv, HEADER, uploadCsv } from '../helpers/importFixtures'
import { ackCode, oru, send } from '../helpers/hl7'
import { startTestListener } from '../helpers/hl7Listener'
import { factsFromScratch, storedFacts, type EpisodeFacts } from '../helpers/episodeFacts'
import { milestonesFromScratch, storedMilestones, type Milestones } from '../helpers/referralMilestones'
import type { MllpListener } from '../../server/services/hl7/listener'
import { Referral } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

/**
 * Issue #19 point 4: the quality report reads its per-episode facts from a pre-aggregate (episode_facts,
 * migration 0026) that every writing unit of work refreshes in its own transaction (no triggers). Here the
 * writes go through the real routes and the HL7 listener, as the clinic makes them: typed-in results, an HL7
 * result and its correction, a laboratory CSV import and its reversal, a prescription and a dose, transfusions
 * recorded, corrected and voided, the post-operative record and a move of its surgery date, a postponement
 * for anaemia. After each step the table must equal the facts worked out from the raw rows in TypeScript
 * (tests/helpers/episodeFacts.ts), and the quality report the count from those facts.
 * The funnel's and waiting times' per-referral milestones (referral_milestones, migration 0027) are kept by the
 * same writers and by every stage move: after each step that table must equal the milestones worked out from the
 * raw rows (tests/helpers/referralMilestones.ts) too.
 */
let t: TestApp
let listener: MllpListener
let port: number
let doctor: Client
let nurse: Client
let asAdmin: Client
const ids = { e1: 0, e2: 0, e3: 0, e4: 0, e5: 0 }

const today = todayIso()
const day = (n: number) => addDays(today, n)
const noon = (n: number) => `${day(n)}T12:00:00.000Z`
const version = async (id: number) => (await Referral.findByPk(id))!.version

beforeAll(async () => {
  t = makeTestApp()
  ;({ listener, port } = await startTestListener(t.sequelize, t.config))
  await cleanDatabase(t.sequelize)
  await loadStarterFormulary()
  const surgeon = await makeStaff('surgeon')
  const d = await makeStaff('doctor')
  const n = await makeStaff('nurse')
  const a = await makeStaff('admin')
  doctor = await new Client(t.app).mustSignIn(d.email, d.password)
  nurse = await new Client(t.app).mustSignIn(n.email, n.password)
  asAdmin = await new Client(t.app).mustSignIn(a.email, a.password)
  // Operated episodes referred 90 days ago, with no Hb yet (the results come through the routes below).
  const episode = async (mrn: string, sex: 'female' | 'male', stage: 'operated' | 'clinic' | 'screened') => {
    const e = await makeEpisode({
      surgeonId: surgeon.id,
      sex,
      hb: [],
      iron: null,
      patient: { mrn, dateOfBirth: '1960-01-01' },
      referral: { stage, ironStatus: 'absolute-deficiency', plannedSurgeryDate: day(-5) },
    })
    await t.sequelize.query('UPDATE referrals SET created_at = ? WHERE id = ?', {
      type: QueryTypes.UPDATE,
      replacements: [new Date(Date.now() - 90 * 86_400_000), e.referral.id],
    })
    return e.referral.id
  }
  ids.e1 = await episode('QEF0001', 'female', 'operated')
  ids.e2 = await episode('QEF0002', 'male', 'operated')
  ids.e3 = await episode('QEF0003', 'female', 'operated')
  ids.e4 = await episode('QEF0004', 'female', 'clinic')
  ids.e5 = await episode('QEF0005', 'male', 'screened')
})
afterAll(async () => {
  await listener.stop()
  await t.close()
})

async function expectFactsFromScratch(): Promise<Map<number, EpisodeFacts>> {
  await expectMilestonesFromScratch()
  const scratch = await factsFromScratch()
  expect(await storedFacts(t.sequelize)).toEqual(scratch)
  return scratch
}

async function expectMilestonesFromScratch(): Promise<Map<number, Milestones>> {
  const scratch = await milestonesFromScratch()
  expect(await storedMilestones(t.sequelize)).toEqual(scratch)
  return scratch
}

const outcome = async (id: number, surgeryDate: string) => {
  const res = await nurse.post(`/api/referrals/${id}/outcome`, {
    surgeryDate,
    bloodLossMl: 700,
    unitsCrossmatched: 0,
    lowestHbGL: 80,
    dischargeHbGL: 95,
    lengthOfStayDays: 4,
    complications: ['none'],
    version: await version(id),
  })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
}
const typedHb = async (id: number, value: number, at: string) => {
  const res = await nurse.post(`/api/referrals/${id}/results`, { analyte: 'hb', value, unit: 'g/L', takenAt: at })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
}
const unit = (o: Record<string, unknown> = {}) => ({
  givenAt: new Date(Date.now() - 60_000).toISOString(),
  component: 'red-cells',
  units: 1,
  preTransfusionHbGL: 60,
  reassessedBeforeNext: true,
  postTransfusionHbGL: 79,
  informationGiven: true,
  productCodes: ['E0336V00'],
  ...o,
})

describe('the quality pre-aggregate after writes through the routes', () => {
  it('when an outcome is recorded and typed-in results arrive, then the table follows; no outcome, no row', async () => {
    await typedHb(ids.e1, 100, noon(-40))
    await outcome(ids.e1, day(-5))
    await typedHb(ids.e1, 125, noon(-20))
    await typedHb(ids.e4, 90, noon(-2))
    const f = await expectFactsFromScratch()
    expect(f.get(ids.e1)).toMatchObject({ firstHbGL: 100, surgeryDayHbGL: 125, screened28: 1, screened1445: 1 })
    expect(f.has(ids.e4)).toBe(false)
  })

  it('when a prescription and a dose are recorded, then iron prescribed and iron before surgery follow', async () => {
    const rx = await doctor.post(`/api/referrals/${ids.e1}/prescriptions`, {
      productCode: 'ferric-carboxymaltose',
      firstDoseDate: day(-10),
      cautions: noCautions,
      version: await version(ids.e1),
    })
    expect(rx.status, JSON.stringify(rx.body)).toBe(201)
    expect((await expectFactsFromScratch()).get(ids.e1)).toMatchObject({ ironPrescribed: 1, ironBefore: 0 })
    const dose = await nurse.post(`/api/referrals/${ids.e1}/administrations`, {
      prescriptionId: rx.body.prescription.id,
      doseMg: 1000,
      givenAt: noon(-10),
      batchNumber: 'QEF-1',
      reaction: 'none',
    })
    expect(dose.status, JSON.stringify(dose.body)).toBe(201)
    expect((await expectFactsFromScratch()).get(ids.e1)).toMatchObject({ ironBefore: 1 })
  })

  it('when the surgery date is moved on the post-operative record, then every fact counted against it moves', async () => {
    await outcome(ids.e1, day(-15))
    // The dose (day −10) is now after surgery; the Hb of day −20 is the last on or before it, day −40 is 25 days before.
    expect((await expectFactsFromScratch()).get(ids.e1)).toMatchObject({
      surgeryDate: day(-15),
      ironBefore: 0,
      surgeryDayHbGL: 125,
      screened28: 0,
      screened1445: 1,
    })
  })

  it('when an HL7 result arrives and the laboratory corrects it, then the corrected value is the one counted', async () => {
    await outcome(ids.e3, day(-3))
    const at = new Date(`${noon(-30)}`)
    const [first] = await send(port, oru({ mrn: 'QEF0003', at, obx: [{ value: '118', unit: 'g/L', at }] }))
    expect(ackCode(first!)).toBe('AA')
    expect((await expectFactsFromScratch()).get(ids.e3)).toMatchObject({ firstHbGL: 118, surgeryDayHbGL: 118 })
    const [corrected] = await send(port, oru({ mrn: 'QEF0003', at, obx: [{ value: '108', unit: 'g/L', status: 'C', at }] }))
    expect(ackCode(corrected!)).toBe('AA')
    expect((await expectFactsFromScratch()).get(ids.e3)).toMatchObject({ firstHbGL: 108, surgeryDayHbGL: 108 })
  })

  it('when the surgery date is postponed for anaemia, then the postponement is counted', async () => {
    const res = await doctor.patch(`/api/referrals/${ids.e3}`, {
      version: await version(ids.e3),
      plannedSurgeryDate: day(10),
      dateChangeReason: 'anaemia',
    })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect((await expectFactsFromScratch()).get(ids.e3)).toMatchObject({ postponementsForAnaemia: 1 })
  })

  it('when a laboratory CSV is imported and then reversed, then its Hb counts and then no longer does', async () => {
    await outcome(ids.e2, day(-3))
    const imported = await uploadCsv(nurse, csv([HEADER, ['QEF0002', 'HB', 95, 'g/L', noon(-35).replace('.000Z', 'Z')]]), {
      commit: true,
    })
    expect(imported.status, JSON.stringify(imported.body)).toBe(201)
    expect((await expectFactsFromScratch()).get(ids.e2)).toMatchObject({ firstHbGL: 95, screened28: 1, screened1445: 1 })
    const reversed = await doctor.post(`/api/imports/${imported.body.batchId}/reversal`, { reason: 'File of another hospital' })
    expect(reversed.status, JSON.stringify(reversed.body)).toBe(200)
    expect((await expectFactsFromScratch()).get(ids.e2)).toMatchObject({ firstHbGL: null, surgeryDayHbGL: null, screened28: 0 })
  })

  it('when transfusions are recorded, corrected and voided, then the sums are those of the standing rows', async () => {
    const a = await nurse.post(`/api/referrals/${ids.e2}/transfusions`, unit())
    expect(a.status, JSON.stringify(a.body)).toBe(201)
    const b = await nurse.post(`/api/referrals/${ids.e2}/transfusions`, unit({ units: 2, reassessedBeforeNext: false }))
    expect(b.status, JSON.stringify(b.body)).toBe(201)
    expect((await expectFactsFromScratch()).get(ids.e2)).toMatchObject({ rbcRows: 2, rbcUnits: 3, rbcSingle: 1, rbcReassessed: 1 })
    const edited = await nurse.put(`/api/referrals/${ids.e2}/transfusions/${a.body.transfusion.id}`, {
      ...unit({ informationGiven: false, postTransfusionHbGL: null }),
      changeReason: 'Post-transfusion Hb was entered on the wrong unit',
    })
    expect(edited.status, JSON.stringify(edited.body)).toBe(200)
    const voided = await nurse.post(`/api/referrals/${ids.e2}/transfusions/${b.body.transfusion.id}/void`, {
      reason: 'Recorded on the wrong patient',
    })
    expect(voided.status, JSON.stringify(voided.body)).toBe(200)
    expect((await expectFactsFromScratch()).get(ids.e2)).toMatchObject({
      rbcRows: 1,
      rbcUnits: 1,
      rbcSingle: 1,
      rbcReassessed: 0,
      anyTransfusions: 1,
      informationOnTransfusion: 0,
    })
  })

  it('when the laboratory deletes an HL7 Hb, then the last Hb is the one before it again', async () => {
    const at = new Date(`${noon(-1)}`)
    const [added] = await send(port, oru({ mrn: 'QEF0004', at, obx: [{ value: '99', unit: 'g/L', at }] }))
    expect(ackCode(added!)).toBe('AA')
    expect((await expectMilestonesFromScratch()).get(ids.e4)).toMatchObject({ firstHbAt: noon(-2), lastHbAt: noon(-1) })
    const [deleted] = await send(port, oru({ mrn: 'QEF0004', at, obx: [{ value: '', unit: 'g/L', status: 'D', at }] }))
    expect(ackCode(deleted!)).toBe('AA')
    expect((await expectMilestonesFromScratch()).get(ids.e4)).toMatchObject({ firstHbAt: noon(-2), lastHbAt: noon(-2) })
  })

  it('when an imported Hb is reversed and the episode moves to clinic, cleared and operated, then its milestones follow', async () => {
    expect((await expectMilestonesFromScratch()).has(ids.e5)).toBe(false)
    const imported = await uploadCsv(nurse, csv([HEADER, ['QEF0005', 'HB', 140, 'g/L', noon(-8).replace('.000Z', 'Z')]]), {
      commit: true,
    })
    expect(imported.status, JSON.stringify(imported.body)).toBe(201)
    expect((await expectMilestonesFromScratch()).get(ids.e5)).toMatchObject({ firstHbAt: noon(-8), lastHbAt: noon(-8) })
    const reversed = await doctor.post(`/api/imports/${imported.body.batchId}/reversal`, { reason: 'File of another hospital' })
    expect(reversed.status, JSON.stringify(reversed.body)).toBe(200)
    // Nothing left: no row, as a referral without milestones has none.
    expect((await expectMilestonesFromScratch()).has(ids.e5)).toBe(false)
    for (const to of ['clinic', 'cleared', 'operated'] as const) {
      const res = await doctor.post(`/api/referrals/${ids.e5}/transitions`, { to, version: await version(ids.e5) })
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      await expectMilestonesFromScratch()
    }
    expect((await expectMilestonesFromScratch()).get(ids.e5)).toMatchObject({ cleared: 1, operated: 1, surgeryDate: null })
    expect((await expectMilestonesFromScratch()).get(ids.e5)?.clinicAt).not.toBeNull()
  })

  it('when the quality report is asked for, then each measure built on the facts is the count from the raw rows', async () => {
    const facts = await expectFactsFromScratch()
    const res = await asAdmin.get(`/api/reports/quality?from=${day(-60)}&to=${today}`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const referrals = await Referral.findAll({ raw: true })
    // The default clinic criteria judge both sexes at 130 g/L (the surgical consensus), strict "<".
    const anaemic = (gl: number | null) => gl !== null && gl < 130
    const es = [...facts.entries()].map(([id, f]) => ({ f, r: referrals.find((r) => r.id === id)! }))
    const count = (test: (e: (typeof es)[number]) => boolean) => es.filter(test).length
    const ida = (e: (typeof es)[number]) =>
      anaemic(e.f.firstHbGL) &&
      (e.r.ironStatus === 'absolute-deficiency' || e.r.ironStatus === 'iron-restricted' || e.f.ironPrescribed === 1)
    const rbcRows = es.reduce((n, e) => n + e.f.rbcRows, 0)
    const expected = {
      'iron-before-surgery': [count((e) => ida(e) && e.f.ironBefore === 1), count(ida)],
      'screened-28-days-before': [count((e) => e.f.screened28 === 1), es.length],
      'screened-in-window-14-45': [count((e) => e.f.screened1445 === 1), es.length],
      'anaemic-on-day-of-surgery': [count((e) => anaemic(e.f.surgeryDayHbGL)), count((e) => e.f.surgeryDayHbGL !== null)],
      transfused: [count((e) => e.f.rbcUnits > 0), es.length],
      'single-unit-red-cell-transfusions': [es.reduce((n, e) => n + e.f.rbcSingle, 0), rbcRows],
      'reassessed-after-each-unit': [es.reduce((n, e) => n + e.f.rbcReassessed, 0), rbcRows],
      'postponed-for-anaemia': [count((e) => e.f.postponementsForAnaemia > 0), es.length],
    }
    const measures = res.body.measures as { id: string; numerator: number; denominator: number }[]
    const got = Object.fromEntries(
      Object.keys(expected).map((id) => [id, measures.filter((m) => m.id === id).map((m) => [m.numerator, m.denominator])[0]]),
    )
    expect(got).toEqual(expected)
    expect(es).toHaveLength(3)
  })
})
