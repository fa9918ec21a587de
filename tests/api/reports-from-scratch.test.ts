import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { QueryTypes } from 'sequelize'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import {
  Administration,
  ClinicSettingsRow,
  Outcome,
  Patient,
  Prescription,
  Referral,
  Result,
  StageTransition,
} from '../../server/models/index'
import { STAGES } from '../../shared/pathway'
import { classifyAnaemia, type AnaemiaCriteria } from '../../shared/clinical'
import { DEFAULT_CLINIC_SETTINGS } from '../../shared/clinic/settings'
import { factsAfterHandWrites, factsFromScratch, storedFacts } from '../helpers/episodeFacts'

/**
 * Issue #19: the funnel and waiting times are computed by grouped SQL passes and grouped day counts
 * (server/services/reports/funnel.ts, waitingTimes.ts). Here the same figures are worked out from
 * the raw rows in plain TypeScript, one episode at a time, on a varied fixture: every stage, Hb
 * values voided or preliminary (never counted), several moves to clinic, missing dates, operations
 * with and without a post-operative record, referrals on both edges of the period, two surgeons and
 * two operations. The answers must be equal for an admin, for one operation, and for a surgeon (who
 * sees only their own patients whatever they ask for). The quality report's Hb measures (read from the
 * per-episode pre-aggregate episode_facts, judged live against the clinic's thresholds, qualitySql.ts) are
 * checked the same way, and the pre-aggregate itself against the raw rows (tests/helpers/episodeFacts.ts).
 */
let t: TestApp
let s1: StaffFixture
let s2: StaffFixture
let asAdmin: Client
let asSurgeon: Client

const FROM = '2025-03-01'
const TO = '2025-06-30'
const DAY = 86_400_000

// A small deterministic PRNG, so the fixture is the same on every run.
function prng(seed: number) {
  return () => {
    seed = (seed + 0x6d2b79f5) | 0
    let x = Math.imul(seed ^ (seed >>> 15), 1 | seed)
    x = (x + Math.imul(x ^ (x >>> 7), 61 | x)) ^ x
    return ((x ^ (x >>> 14)) >>> 0) / 4294967296
  }
}

const at = (day: string, time = '12:00:00') => new Date(`${day}T${time}.000Z`)
const plus = (d: Date, days: number) => new Date(d.getTime() + days * DAY)
const iso = (d: Date) => d.toISOString().slice(0, 10)

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  s1 = await makeStaff('surgeon', { name: 'Surgeon Scratch One' })
  s2 = await makeStaff('surgeon', { name: 'Surgeon Scratch Two' })
  const knee = await makeProcedure({ code: 'SCRKNEE' })
  const hip = await makeProcedure({ code: 'SCRHIP' })
  const rand = prng(19_04)
  const pick = <T>(xs: readonly T[]) => xs[Math.floor(rand() * xs.length)]!
  // The period's edges, then days from two weeks before it to two weeks after it.
  const created = ['2025-03-01 00:00:00', '2025-02-28 23:59:59', '2025-06-30 23:59:59', '2025-07-01 00:00:00']
  for (let i = 0; i < 56; i++) {
    const createdAt = created[i] ? new Date(`${created[i]!.replace(' ', 'T')}.000Z`) : plus(at('2025-02-15'), Math.floor(rand() * 150))
    const p = await makePatient({ sex: pick(['female', 'male'] as const) })
    const r = await makeReferral(
      { patientId: p.id, procedureId: pick([knee.id, hip.id]), surgeonId: pick([s1.id, s2.id]) },
      {
        stage: pick(STAGES),
        plannedSurgeryDate: iso(plus(createdAt, 20 + Math.floor(rand() * 60))),
        anaemic: pick([true, false, null]),
        ironStatus: pick(['absolute-deficiency', 'iron-restricted', 'replete', null] as const),
      },
    )
    await t.sequelize.query('UPDATE referrals SET created_at = ? WHERE id = ?', {
      type: QueryTypes.UPDATE,
      replacements: [createdAt, r.id],
    })
    // Hb results: none, or up to four, each final, corrected, preliminary or voided.
    const hbCount = pick([0, 1, 2, 3, 4])
    for (let k = 0; k < hbCount; k++) {
      const kind = pick(['final', 'final', 'corrected', 'preliminary', 'voided'] as const)
      await Result.create({
        referralId: r.id,
        patientId: p.id,
        analyte: 'hb',
        valueCanonical: 90 + Math.floor(rand() * 60),
        unitCanonical: 'g/L',
        valueReported: 100,
        unitReported: 'g/L',
        takenAt: plus(createdAt, Math.floor(rand() * 50) - 3),
        enteredBy: null,
        derivedFrom: null,
        status: kind === 'voided' ? 'final' : kind,
        voidedAt: kind === 'voided' ? plus(createdAt, 60) : null,
        voidReason: kind === 'voided' ? 'entered on the wrong episode (test)' : null,
      })
    }
    // Moves: to clinic (none, once or twice), cleared, operated.
    for (let k = pick([0, 0, 1, 2]); k > 0; k--)
      await StageTransition.create({
        referralId: r.id,
        fromStage: null,
        toStage: 'clinic',
        reason: null,
        userId: null,
        at: plus(createdAt, 5 + Math.floor(rand() * 30)),
      })
    if (rand() < 0.4)
      await StageTransition.create({
        referralId: r.id,
        fromStage: null,
        toStage: 'cleared',
        reason: null,
        userId: null,
        at: plus(createdAt, 40),
      })
    if (rand() < 0.3)
      await StageTransition.create({
        referralId: r.id,
        fromStage: null,
        toStage: 'operated',
        reason: null,
        userId: null,
        at: plus(createdAt, 55),
      })
    // Treatment: a prescription alone, or with one or two doses given.
    if (rand() < 0.5) {
      const rx = await Prescription.create({
        referralId: r.id,
        productCode: 'ferric-carboxymaltose',
        route: 'iv',
        weightKg: 70,
        hbGL: 100,
        targetHbGL: 150,
        deficitMg: 1000,
        totalMg: 1000,
        firstDoseDate: iso(plus(createdAt, 10)),
        plan: { doses: [], warnings: [] },
        cautions: {} as never,
        overrideReason: null,
        status: 'completed',
        prescribedBy: null,
        prescribedAt: plus(createdAt, 8),
      })
      for (let k = pick([0, 1, 2]); k > 0; k--)
        await Administration.create({
          prescriptionId: rx.id,
          referralId: r.id,
          doseMg: 500,
          givenAt: plus(createdAt, 9 + Math.floor(rand() * 25)),
          batchNumber: 'SCRATCH',
          reaction: 'none',
          reactionNotes: null,
          givenBy: null,
        })
    }
    if (rand() < 0.45) await plainOutcome(r.id, iso(plus(createdAt, 30 + Math.floor(rand() * 40))))
  }
  // Operated episodes made for the quality report's Hb measures (referred today, so outside the funnel's
  // period): the first Hb differs from the last one, an Hb just after the surgery day, two Hb at the same
  // instant (the later id is the later one), voided and preliminary values, and the screening window's edges.
  const S = '2025-05-20'
  const hbAt = async (
    r: { id: number; patientId: number },
    takenAt: Date,
    gl: number,
    kind: 'final' | 'preliminary' | 'voided' = 'final',
  ) =>
    Result.create({
      referralId: r.id,
      patientId: r.patientId,
      analyte: 'hb',
      valueCanonical: gl,
      unitCanonical: 'g/L',
      valueReported: gl,
      unitReported: 'g/L',
      takenAt,
      enteredBy: null,
      derivedFrom: null,
      status: kind === 'preliminary' ? 'preliminary' : 'final',
      voidedAt: kind === 'voided' ? at('2025-05-01') : null,
      voidReason: kind === 'voided' ? 'entered on the wrong episode (test)' : null,
    })
  const shaped: [string, 'female' | 'male', [string, string, number, ('final' | 'preliminary' | 'voided')?][]][] = [
    [
      'A',
      'female',
      [
        ['2025-04-01', '09:00:00', 140],
        ['2025-05-10', '09:00:00', 140],
        ['2025-05-21', '00:00:00', 100],
      ],
    ],
    [
      'B',
      'male',
      [
        ['2025-04-01', '09:00:00', 100],
        [S, '23:59:59', 140],
      ],
    ],
    [
      'C',
      'female',
      [
        ['2025-04-05', '10:00:00', 100],
        ['2025-04-05', '10:00:00', 140],
      ],
    ],
    [
      'D',
      'male',
      [
        ['2025-03-01', '09:00:00', 100, 'voided'],
        ['2025-04-01', '09:00:00', 140],
        ['2025-05-19', '09:00:00', 100, 'preliminary'],
      ],
    ],
    ['E', 'female', [['2025-04-05', '00:00:00', 100]]],
    ['F', 'male', [['2025-05-07', '00:00:00', 140]]],
  ]
  for (const [label, sex, hbs] of shaped) {
    const p = await makePatient({ sex })
    const r = await makeReferral(
      { patientId: p.id, procedureId: knee.id, surgeonId: s1.id },
      { stage: 'operated', ironStatus: 'absolute-deficiency' },
    )
    for (const [day, time, gl, kind] of hbs) await hbAt({ id: r.id, patientId: p.id }, at(day, time), gl, kind)
    if (label === 'B') {
      const rx = await Prescription.create({
        referralId: r.id,
        productCode: 'ferric-carboxymaltose',
        route: 'iv',
        weightKg: 70,
        hbGL: 100,
        targetHbGL: 150,
        deficitMg: 1000,
        totalMg: 1000,
        firstDoseDate: '2025-04-10',
        plan: { doses: [], warnings: [] },
        cautions: {} as never,
        overrideReason: null,
        status: 'completed',
        prescribedBy: null,
        prescribedAt: at('2025-04-08'),
      })
      await Administration.create({
        prescriptionId: rx.id,
        referralId: r.id,
        doseMg: 1000,
        givenAt: at('2025-04-10'),
        batchNumber: 'SCRATCH',
        reaction: 'none',
        reactionNotes: null,
        givenBy: null,
      })
    }
    await plainOutcome(r.id, S)
  }
  await factsAfterHandWrites()
  const a = await makeStaff('admin')
  asAdmin = await new Client(t.app).mustSignIn(a.email, a.password)
  asSurgeon = await new Client(t.app).mustSignIn(s1.email, s1.password)
})
afterAll(async () => {
  await t.close()
})

/** Each referral of the period (filters applied in TypeScript) with its milestones, from the raw rows. */
async function episodes(filter: { surgeonId?: number; procedureCode?: string }) {
  const [referrals, results, moves, prescriptions, doses, outcomes] = await Promise.all([
    Referral.findAll({ include: ['procedure'] }),
    Result.findAll(),
    StageTransition.findAll(),
    Prescription.findAll(),
    Administration.findAll(),
    Outcome.findAll(),
  ])
  const lo = at(FROM, '00:00:00').getTime()
  const hi = at(TO, '00:00:00').getTime() + DAY
  return referrals
    .filter((r) => r.createdAt.getTime() >= lo && r.createdAt.getTime() < hi)
    .filter((r) => filter.surgeonId === undefined || r.surgeonId === filter.surgeonId)
    .filter(
      (r) =>
        filter.procedureCode === undefined || (r as unknown as { procedure: { code: string } }).procedure.code === filter.procedureCode,
    )
    .map((r) => {
      const hb = results
        .filter((x) => x.referralId === r.id && x.analyte === 'hb' && x.voidedAt === null && x.status !== 'preliminary')
        .map((x) => x.takenAt.getTime())
      const given = doses.filter((x) => x.referralId === r.id).map((x) => x.givenAt.getTime())
      const mine = moves.filter((x) => x.referralId === r.id)
      const clinic = mine.filter((x) => x.toStage === 'clinic').map((x) => x.at.getTime())
      const outcome = outcomes.find((x) => x.referralId === r.id)
      return {
        r,
        firstHb: hb.length ? Math.min(...hb) : null,
        lastHb: hb.length ? Math.max(...hb) : null,
        firstDose: given.length ? Math.min(...given) : null,
        clinicAt: clinic.length ? Math.min(...clinic) : null,
        prescribed: prescriptions.some((x) => x.referralId === r.id),
        cleared: mine.some((x) => x.toStage === 'cleared'),
        operated: outcome !== undefined || mine.some((x) => x.toStage === 'operated'),
        surgeryDate: outcome ? String(outcome.surgeryDate) : null,
      }
    })
}

// Calendar days between two instants (or dates), as MariaDB's DATEDIFF counts them in UTC.
const dayNo = (v: number | string) => Math.floor((typeof v === 'string' ? Date.parse(`${v}T00:00:00Z`) : v) / DAY)
const days = (a: number | string | null, b: number | string | null) => (a === null || b === null ? null : dayNo(b) - dayNo(a))

async function expectedFunnel(filter: { surgeonId?: number; procedureCode?: string }) {
  const es = await episodes(filter)
  const count = (f: (e: (typeof es)[number]) => boolean) => es.filter(f).length
  return {
    referred: es.length,
    screened: count((e) => e.firstHb !== null),
    anaemicOrDeficient: count(
      (e) => e.r.anaemic === true || e.r.ironStatus === 'absolute-deficiency' || e.r.ironStatus === 'iron-restricted' || e.prescribed,
    ),
    treated: count((e) => e.firstDose !== null),
    rechecked: count((e) => e.firstDose !== null && e.lastHb !== null && e.lastHb > e.firstDose),
    cleared: count((e) => e.cleared),
    operated: count((e) => e.operated),
    screenedEarly: count((e) => e.operated && e.firstHb !== null && days(e.firstHb, e.surgeryDate ?? e.r.plannedSurgeryDate)! >= 28),
  }
}

/** PERCENTILE_CONT over every episode's value, sorted in full: no grouping. */
function centile(values: number[], p: number): number | null {
  if (values.length === 0) return null
  const v = [...values].sort((a, b) => a - b)
  const pos = p * (v.length - 1)
  const below = v[Math.floor(pos)]!
  return Math.round((below + (pos - Math.floor(pos)) * (v[Math.ceil(pos)]! - below)) * 10) / 10
}

async function expectedWaitingTimes(filter: { surgeonId?: number; procedureCode?: string }) {
  const es = await episodes(filter)
  const legs = {
    referralToScreening: es.map((e) => days(e.r.createdAt.getTime(), e.firstHb)),
    screeningToClinic: es.map((e) => days(e.firstHb, e.clinicAt)),
    clinicToTreatment: es.map((e) => days(e.clinicAt, e.firstDose)),
    treatmentToSurgery: es.map((e) => days(e.firstDose, e.surgeryDate)),
    referralToSurgery: es.map((e) => days(e.r.createdAt.getTime(), e.surgeryDate)),
  }
  return Object.entries(legs).map(([leg, all]) => {
    const v = all.filter((x): x is number => x !== null)
    return { leg, episodes: v.length, medianDays: centile(v, 0.5), p90Days: centile(v, 0.9) }
  })
}

async function answer(client: Client, name: string, extra = '') {
  const res = await client.get(`/api/reports/${name}?from=${FROM}&to=${TO}${extra}`)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body.tables
}

const CASES = [
  ['an admin, the whole period', () => asAdmin, '', {}],
  ['an admin, one operation', () => asAdmin, '&procedureCode=SCRHIP', { procedureCode: 'SCRHIP' }],
  ['an admin, one surgeon', () => asAdmin, '', { surgeon: 2 }],
  ['a surgeon (own patients only, whatever is asked)', () => asSurgeon, '', { surgeon: 1 }],
] as const

/** An operated episode's post-operative record with nothing of note: only the referral and the surgery day vary. */
function plainOutcome(referralId: number, surgeryDate: string) {
  return Outcome.create({
    referralId,
    surgeryDate,
    bloodLossMl: 300,
    unitsTransfusedIntraOp: 0,
    unitsTransfusedPostOp: 0,
    unitsCrossmatched: 0,
    lowestHbGL: 90,
    dischargeHbGL: null,
    lengthOfStayDays: 3,
    complications: ['none'],
    recordedBy: null,
  })
}

describe('funnel and waiting times against a count from scratch', () => {
  it('when the fixture is varied, then it has what the comparison needs', async () => {
    const es = await episodes({})
    // Both edges of the period are in it; the day before and the day after are not.
    expect(es.map((e) => e.r.createdAt.toISOString())).toEqual(
      expect.arrayContaining(['2025-03-01T00:00:00.000Z', '2025-06-30T23:59:59.000Z']),
    )
    expect(es.some((e) => e.r.createdAt.toISOString() === '2025-02-28T23:59:59.000Z')).toBe(false)
    expect(es.some((e) => e.r.createdAt.toISOString() === '2025-07-01T00:00:00.000Z')).toBe(false)
    const f = await expectedFunnel({})
    for (const v of Object.values(f)) expect(v).toBeGreaterThan(0)
    expect(f.referred).toBeGreaterThan(f.screened)
    const [{ n }] = await t.sequelize.query<{ n: number }>(
      "SELECT COUNT(*) AS n FROM results WHERE voided_at IS NOT NULL OR status = 'preliminary'",
      { type: QueryTypes.SELECT },
    )
    expect(Number(n)).toBeGreaterThan(5)
  })

  it.each(CASES)('when %s asks for the funnel, then each step is the count from scratch', async (_, client, extra, o) => {
    const filter = {
      ...('procedureCode' in o ? { procedureCode: o.procedureCode } : {}),
      ...('surgeon' in o ? { surgeonId: (o.surgeon === 1 ? s1 : s2).id } : {}),
    }
    const q = 'surgeon' in o && client() === asAdmin ? `${extra}&surgeonId=${filter.surgeonId}` : extra
    const rows = (await answer(client(), 'funnel', q)).funnel.rows as { step: string; count: number }[]
    expect(Object.fromEntries(rows.map((r) => [r.step, r.count]))).toEqual(await expectedFunnel(filter))
  })

  it.each(CASES)('when %s asks for waiting times, then each leg is the from-scratch count and centiles', async (_, client, extra, o) => {
    const filter = {
      ...('procedureCode' in o ? { procedureCode: o.procedureCode } : {}),
      ...('surgeon' in o ? { surgeonId: (o.surgeon === 1 ? s1 : s2).id } : {}),
    }
    const q = 'surgeon' in o && client() === asAdmin ? `${extra}&surgeonId=${filter.surgeonId}` : extra
    const rows = (await answer(client(), 'waiting-times', q)).waitingTimes.rows as Record<string, unknown>[]
    const expected = await expectedWaitingTimes(filter)
    expect(rows.map((r) => ({ leg: r.leg, episodes: r.episodes, medianDays: r.medianDays, p90Days: r.p90Days }))).toEqual(expected)
    expect(expected.filter((l) => l.episodes > 1).length).toBeGreaterThanOrEqual(4)
  })
})

/**
 * The quality measures built on Hb, from the raw rows: the first counted Hb (by time, then id) and the
 * last one on or before the surgery day, judged with the clinic's thresholds (the default settings:
 * the fixture changes none), for the operated episodes whose surgery date is in the period.
 */
async function expectedQuality(
  filter: { surgeonId?: number; procedureCode?: string },
  criteria: AnaemiaCriteria = DEFAULT_CLINIC_SETTINGS.anaemiaCriteria,
) {
  const [referrals, patients, results, prescriptions, doses, outcomes] = await Promise.all([
    Referral.findAll({ include: ['procedure'] }),
    Patient.findAll(),
    Result.findAll(),
    Prescription.findAll(),
    Administration.findAll(),
    Outcome.findAll(),
  ])
  const threshold = (sex: string) => classifyAnaemia({ hbGL: 100, sex: sex === 'male' ? 'male' : 'female', criteria }).thresholdGL
  const tally = { iron: [0, 0], screened28: [0, 0], window: [0, 0], dayOfSurgery: [0, 0] }
  for (const o of outcomes) {
    const surgery = String(o.surgeryDate)
    if (surgery < FROM || surgery > TO) continue
    const r = referrals.find((x) => x.id === o.referralId)!
    if (filter.surgeonId !== undefined && r.surgeonId !== filter.surgeonId) continue
    const code = (r as unknown as { procedure: { code: string } }).procedure.code
    if (filter.procedureCode !== undefined && code !== filter.procedureCode) continue
    const anaemic = (gl: number) => gl < threshold(patients.find((x) => x.id === r.patientId)!.sex)
    const hb = results
      .filter((x) => x.referralId === r.id && x.analyte === 'hb' && x.voidedAt === null && x.status !== 'preliminary')
      .sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime() || a.id - b.id)
    const s = at(surgery, '00:00:00').getTime()
    const first = hb[0]
    const last = hb.filter((x) => x.takenAt.getTime() < s + DAY).pop()
    const ida =
      first !== undefined &&
      anaemic(first.valueCanonical) &&
      (r.ironStatus === 'absolute-deficiency' || r.ironStatus === 'iron-restricted' || prescriptions.some((x) => x.referralId === r.id))
    const ironBefore = doses.some((x) => x.referralId === r.id && x.givenAt.getTime() < s + DAY)
    tally.iron[0]! += Number(ida && ironBefore)
    tally.iron[1]! += Number(ida)
    tally.screened28[0]! += Number(first !== undefined && days(first.takenAt.getTime(), surgery)! >= 28)
    tally.screened28[1]! += 1
    tally.window[0]! += Number(hb.some((x) => x.takenAt.getTime() >= s - 45 * DAY && x.takenAt.getTime() < s - 13 * DAY))
    tally.window[1]! += 1
    tally.dayOfSurgery[0]! += Number(last !== undefined && anaemic(last.valueCanonical))
    tally.dayOfSurgery[1]! += Number(last !== undefined)
  }
  return {
    'iron-before-surgery': tally.iron,
    'screened-28-days-before': tally.screened28,
    'screened-in-window-14-45': tally.window,
    'anaemic-on-day-of-surgery': tally.dayOfSurgery,
  }
}

describe('quality measures built on Hb against a count from scratch', () => {
  it('when the per-episode pre-aggregate is rebuilt, then every operated episode has the row its raw rows give', async () => {
    const scratch = await factsFromScratch()
    expect(scratch.size).toBeGreaterThan(20)
    expect(await storedFacts(t.sequelize)).toEqual(scratch)
  })

  it.each(CASES)('when %s asks for the quality report, then each Hb measure is the count from scratch', async (_, client, extra, o) => {
    const filter = {
      ...('procedureCode' in o ? { procedureCode: o.procedureCode } : {}),
      ...('surgeon' in o ? { surgeonId: (o.surgeon === 1 ? s1 : s2).id } : {}),
    }
    const q = 'surgeon' in o && client() === asAdmin ? `${extra}&surgeonId=${filter.surgeonId}` : extra
    const res = await client().get(`/api/reports/quality?from=${FROM}&to=${TO}${q}`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const expected = await expectedQuality(filter)
    const measures = res.body.measures as { id: string; numerator: number; denominator: number }[]
    const got = Object.fromEntries(
      Object.keys(expected).map((id) => {
        const m = measures.find((x) => x.id === id)!
        return [id, [m.numerator, m.denominator]]
      }),
    )
    expect(got).toEqual(expected)
    // The fixture must make each measure count something, and most of them miss some episodes, or the comparison proves little.
    if (Object.keys(o).length === 0) {
      expect(Object.values(expected).every(([n]) => n! > 0)).toBe(true)
      expect(Object.values(expected).filter(([n, d]) => d! > n!).length).toBeGreaterThanOrEqual(2)
    }
  })
})

// The report reads the patient's sex only when the clinic's thresholds differ by sex (the default criteria
// judge both alike, so the cases above never read it): the WHO criteria, against the same count from scratch.
describe('quality measures built on Hb with thresholds that differ by sex', () => {
  it('when the clinic uses the WHO criteria, then each Hb measure is the count from scratch with those thresholds', async () => {
    // A woman whose only Hb (125 g/L) is anaemic by the surgical consensus (130 for both) but not by WHO's 120 for women.
    const p = await makePatient({ sex: 'female' })
    const r = await makeReferral(
      { patientId: p.id, procedureId: (await makeProcedure({ code: 'SCRWHO' })).id, surgeonId: s1.id },
      { stage: 'operated', ironStatus: 'absolute-deficiency' },
    )
    await Result.create({
      referralId: r.id,
      patientId: p.id,
      analyte: 'hb',
      valueCanonical: 125,
      unitCanonical: 'g/L',
      valueReported: 125,
      unitReported: 'g/L',
      takenAt: at('2025-04-10'),
      enteredBy: null,
      derivedFrom: null,
      status: 'final',
      voidedAt: null,
      voidReason: null,
    })
    await plainOutcome(r.id, '2025-05-20')
    await factsAfterHandWrites()
    await ClinicSettingsRow.upsert({ id: 1, values: { anaemiaCriteria: 'who' }, updatedBy: null, updatedAt: new Date() })
    try {
      const res = await asAdmin.get(`/api/reports/quality?from=${FROM}&to=${TO}`)
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      const expected = await expectedQuality({}, 'who')
      const measures = res.body.measures as { id: string; numerator: number; denominator: number }[]
      const got = Object.fromEntries(
        Object.keys(expected).map((id) => [id, measures.filter((m) => m.id === id).map((m) => [m.numerator, m.denominator])[0]]),
      )
      expect(got).toEqual(expected)
      // The fixture must hold Hb values that the two criteria judge differently, or this case proves nothing.
      expect(expected).not.toEqual(await expectedQuality({}, 'surgical'))
    } finally {
      await ClinicSettingsRow.destroy({ where: { id: 1 } })
    }
  })
})
