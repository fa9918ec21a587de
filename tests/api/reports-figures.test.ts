import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { makeReportFixture, type ReportFixture } from './reports-fixture'
import { REPORT_NAMES } from '../../shared/reports'
import { Referral, Result } from '../../server/models/index'

let t: TestApp
let f: ReportFixture
let asAdmin: Client

const PERIOD = 'from=2025-01-01&to=2025-12-31'

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  f = await makeReportFixture(t.sequelize)
  const a = await makeStaff('admin')
  asAdmin = await new Client(t.app).mustSignIn(a.email, a.password)
})
afterAll(async () => {
  await t.close()
})

async function report(name: string, extra = '') {
  const res = await asAdmin.get(`/api/reports/${name}?${PERIOD}${extra}`)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body
}
const byKey = (rows: Record<string, unknown>[], key: string) => Object.fromEntries(rows.map((r) => [r[key], r]))

describe('GET /api/reports/funnel', () => {
  it('when the 2025 fixture is counted, then each step matches the hand count and names its definition', async () => {
    const body = await report('funnel')
    const steps = byKey(body.tables.funnel.rows, 'step')
    // E5 was referred in 2024: outside the period. Referred E1–E4 = 4; screened E1, E2, E3 = 3;
    // anaemic/iron deficient E1, E2 = 2; treated E1 = 1; re-checked E1 (Hb 04-01 after the 03-10 dose) = 1;
    // cleared E1, E3 = 2; operated E1, E2, E3 = 3; first Hb ≥ 28 days before surgery:
    // E1 03-03→04-10 = 38 d yes, E2 03-20→04-05 = 16 d no, E3 05-02→06-15 = 44 d yes → 2 of 3.
    const counts = Object.fromEntries(Object.entries(steps).map(([k, v]) => [k, (v as { count: number }).count]))
    expect(counts).toEqual({
      referred: 4,
      screened: 3,
      anaemicOrDeficient: 2,
      treated: 1,
      rechecked: 1,
      cleared: 2,
      operated: 3,
      screenedEarly: 2,
    })
    expect(steps.screenedEarly.percent).toBe(66.7) // 2 / 3 operated
    expect(steps.screened.percent).toBe(75) // 3 / 4 referred
    expect(body.tables.funnel.definitions.screenedEarly).toMatchObject({ denominator: 'Operated episodes' })
    expect(body.tables.funnel.definitions.referred.period).toMatch(/referred.*2025-01-01 to 2025-12-31/)
    expect(body.period.basis).toMatch(/referral created/)
  })

  it('when filtered to the KNEE operation, then only E1 and E2 count', async () => {
    const body = await report('funnel', '&procedureCode=KNEE')
    expect(byKey(body.tables.funnel.rows, 'step').referred.count).toBe(2)
  })
})

describe('GET /api/reports/waiting-times', () => {
  it('when the legs are measured in calendar days, then the medians and 90th centiles match the hand calculation', async () => {
    const legs = byKey((await report('waiting-times')).tables.waitingTimes.rows, 'leg')
    // Referral → screening: E1 2, E2 15, E3 1 → sorted 1, 2, 15: median 2; p90 at rank 0.9×2 = 1.8 → 2 + 0.8×13 = 12.4.
    expect(legs.referralToScreening).toMatchObject({ episodes: 3, medianDays: 2, p90Days: 12.4 })
    // Only E1 went to clinic (03-03 → 03-08 = 5), was treated (03-08 → 03-10 = 2) and operated 31 days after the dose.
    expect(legs.screeningToClinic).toMatchObject({ episodes: 1, medianDays: 5, p90Days: 5 })
    expect(legs.clinicToTreatment).toMatchObject({ episodes: 1, medianDays: 2 })
    expect(legs.treatmentToSurgery).toMatchObject({ episodes: 1, medianDays: 31 })
    // Referral → surgery: E2 31, E1 40, E3 45: median 40; p90 40 + 0.8×5 = 44.
    expect(legs.referralToSurgery).toMatchObject({ episodes: 3, medianDays: 40, p90Days: 44 })
  })
})

describe('GET /api/reports/haemoglobin', () => {
  it('when screening and surgery-day Hb are binned by 10 g/L, then the counts and the median rise by product match', async () => {
    const body = await report('haemoglobin')
    // Screening (first Hb): 100, 125, 140. Surgery day (last Hb on/before surgery): 120, 125, 140.
    expect(body.tables.distribution.rows).toEqual([
      { binFromGL: 100, binToGL: 110, screening: 1, surgeryDay: 0 },
      { binFromGL: 120, binToGL: 130, screening: 1, surgeryDay: 2 },
      { binFromGL: 140, binToGL: 150, screening: 1, surgeryDay: 1 },
    ])
    // E1 (ferric carboxymaltose) rose 100 → 120 = 20; E2 and E3 untreated rose 0 and 0 → median 0.
    expect(byKey(body.tables.riseByProduct.rows, 'productCode')).toEqual({
      'ferric-carboxymaltose': { productCode: 'ferric-carboxymaltose', patients: 1, medianRiseGL: 20 },
      untreated: { productCode: 'untreated', patients: 2, medianRiseGL: 0 },
    })
    expect(body.period.basis).toMatch(/actual surgery date/)
  })
})

describe('GET /api/reports/transfusion', () => {
  it('when split by operation and treatment, then still-anaemic share, transfusion rate and units per patient match', async () => {
    const body = await report('transfusion')
    const rows = body.tables.byOperation.rows.map((r: Record<string, unknown>) => [
      r.groupKey,
      r.treated,
      r.patients,
      r.stillAnaemicPercent,
      r.transfusionRatePercent,
      r.unitsPerPatient,
    ])
    // Surgical criteria (< 130 g/L): E1 120 anaemic, transfused 1 unit; E2 125 anaemic, none;
    // E3 140 not anaemic, 2 units. HIP sorts before KNEE; untreated (false) before treated.
    expect(rows).toEqual([
      ['HIP', false, 1, 0, 100, 2],
      ['KNEE', false, 1, 100, 0, 0],
      ['KNEE', true, 1, 100, 100, 1],
    ])
    const bySurgeon = body.tables.bySurgeon.rows.map((r: Record<string, unknown>) => [r.groupKey, r.groupName, r.treated, r.units])
    expect(bySurgeon).toEqual(
      expect.arrayContaining([
        [String(f.s1.id), 'Surgeon One', false, 0],
        [String(f.s1.id), 'Surgeon One', true, 1],
        [String(f.s2.id), 'Surgeon Two', false, 2],
      ]),
    )
    expect(body.tables.byOperation.definitions.stillAnaemicPercent.numerator).toMatch(/130/)
  })
})

describe('GET /api/reports/blood-ordering', () => {
  it('when KNEE crossmatched 4 units for 2 patients and 1 was transfused, then C:T 4, T% 50, TI 0.5 and "fewer units"', async () => {
    const rows = byKey((await report('blood-ordering')).tables.bloodOrdering.rows, 'procedureCode')
    // KNEE: 2 + 2 = 4 units crossmatched, 1 unit transfused (E1) → C:T 4/1 = 4 (> 2.5);
    // 1 of 2 crossmatched patients transfused → T% 50; TI 1/2 = 0.5. Mean loss (600 + 400) / 2 = 500.
    expect(rows.KNEE).toMatchObject({
      patients: 2,
      patientsCrossmatched: 2,
      unitsCrossmatched: 4,
      unitsTransfused: 1,
      ctRatio: 4,
      transfusionProbabilityPercent: 50,
      transfusionIndex: 0.5,
      usualBloodOrder: 'crossmatch',
      usualUnits: 2,
      suggestion: 'fewer-units',
      meanBloodLossMl: 500,
      usualBloodLossMl: 500,
    })
    // HIP: nobody crossmatched (indices missing), but 1 of 1 was transfused on group-and-screen → crossmatch.
    expect(rows.HIP).toMatchObject({
      patients: 1,
      patientsCrossmatched: 0,
      ctRatio: null,
      transfusionIndex: null,
      usualBloodOrder: 'group-and-screen',
      suggestion: 'crossmatch',
      meanBloodLossMl: 1000,
    })
  })
})

describe('definitions', () => {
  it.each(['funnel', 'haemoglobin', 'transfusion', 'waiting-times', 'blood-ordering'])(
    'when %s is read, then every definition states a numerator, a denominator and the period',
    async (name) => {
      const body = await report(name)
      for (const table of Object.values(body.tables) as {
        definitions: Record<string, Record<string, string>>
        rows: { definition?: object }[]
      }[]) {
        expect(Object.keys(table.definitions).length).toBeGreaterThan(0)
        for (const d of Object.values(table.definitions)) {
          expect(d.numerator.length * d.denominator.length).toBeGreaterThan(0)
          expect(d.period).toContain('2025-01-01 to 2025-12-31')
        }
        for (const row of table.rows) if ('definition' in row) expect(row.definition).toHaveProperty('period')
      }
    },
  )
})

describe('report names and dates', () => {
  it('when the name is unknown, then 404; when a date is malformed, then 400 naming it', async () => {
    expect((await asAdmin.get('/api/reports/nonsense')).status).toBe(404)
    const bad = await asAdmin.get('/api/reports/funnel?from=2025-13')
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields).toHaveProperty('from')
  })
})

describe('voided and preliminary results in the reports', () => {
  it('when voided and preliminary Hb values are added to the episodes, then no report figure changes', async () => {
    const before = Object.fromEntries(await Promise.all(REPORT_NAMES.map(async (n) => [n, (await report(n)).tables] as const)))
    const add = async (referralId: number, day: string, hbGL: number, o: { voided?: boolean; preliminary?: boolean }) => {
      const r = (await Referral.findByPk(referralId, { raw: true }))!
      return Result.create({
        referralId,
        patientId: r.patientId,
        analyte: 'hb',
        valueCanonical: hbGL,
        unitCanonical: 'g/L',
        valueReported: hbGL,
        unitReported: 'g/L',
        takenAt: new Date(`${day}T09:00:00.000Z`),
        enteredBy: null,
        derivedFrom: null,
        source: 'hl7',
        ...(o.preliminary ? { status: 'preliminary' as const } : {}),
        ...(o.voided ? { voidedAt: new Date(), voidReason: 'deleted by the laboratory' } : {}),
      })
    }
    const [e1, e2, , e4] = f.ids
    const added = [
      // E4 was never screened: either would make it "screened" and give it a first Hb.
      await add(e4!, '2025-06-02', 100, { voided: true }),
      await add(e4!, '2025-06-03', 101, { preliminary: true }),
      // Before E1's first Hb (03-03): either would move its first Hb, its waiting time and its screening bin.
      await add(e1!, '2025-03-02', 90, { preliminary: true }),
      await add(e1!, '2025-03-02', 91, { voided: true }),
      // The day before E1's and E2's surgery: either would become the surgery-day Hb and the re-check after the dose.
      await add(e1!, '2025-04-09', 80, { voided: true }),
      await add(e2!, '2025-04-04', 150, { preliminary: true }),
    ]
    try {
      const after = Object.fromEntries(await Promise.all(REPORT_NAMES.map(async (n) => [n, (await report(n)).tables] as const)))
      expect(after).toEqual(before)
    } finally {
      await Result.destroy({ where: { id: added.map((r) => r.id) } })
    }
  })
})
