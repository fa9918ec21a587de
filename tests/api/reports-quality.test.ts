import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { makeQualityFixture, type QualityFixture } from './quality-fixture'
import { parseCsv } from './reports-fixture'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { AuditEntry, Outcome, Referral, Result } from '../../server/models/index'
import { factsAfterHandWrites } from '../helpers/episodeFacts'

let t: TestApp
let f: QualityFixture
let asAdmin: Client
let asS1: Client

const PERIOD = 'from=2025-01-01&to=2025-12-31'

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  f = await makeQualityFixture()
  const a = await makeStaff('admin')
  asAdmin = await new Client(t.app).mustSignIn(a.email, a.password)
  asS1 = await new Client(t.app).mustSignIn(f.s1.email, f.s1.password)
})
afterAll(async () => {
  await t.close()
})

type M = {
  id: string
  numerator: number
  denominator: number
  percent: number | null
  value: number | null
  definition: { numerator: string; denominator: string; period: string }
  source: string
  benchmark?: { percent: number; source: string }
}
async function quality(c: Client, extra = '') {
  const res = await c.get(`/api/reports/quality?${PERIOD}${extra}`)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body as {
    measures: M[]
    byOperation: { key: string; measures: Record<string, M> }[]
    bySurgeon: { key: string; name: string; measures: Record<string, M> }[]
    trend: { month: string; measures: Record<string, M> }[]
  }
}
const byId = (ms: M[]) => Object.fromEntries(ms.map((m) => [m.id, m]))

describe('GET /api/reports/quality — each measure against the hand count (fixture in quality-fixture.ts)', () => {
  let m: Record<string, M>
  beforeAll(async () => {
    m = byId((await quality(asAdmin)).measures)
  })

  it('when counted for 2025, then Q5 (operated 2024-12-15) is left out and the ids are those the brief names', () => {
    expect(Object.keys(m).sort()).toEqual([
      'anaemic-on-day-of-surgery',
      'cancelled-for-anaemia',
      'crossmatch-against-schedule',
      'iron-before-surgery',
      'median-pre-transfusion-hb',
      'post-operative-iron',
      'postponed-for-anaemia',
      'reassessed-after-each-unit',
      'screened-28-days-before',
      'screened-in-window-14-45',
      'single-unit-red-cell-transfusions',
      'tranexamic-acid',
      'transfused',
      'transfusion-information',
      'units-per-100-operated',
    ])
  })

  // QS138 statement 1. Iron-deficiency anaemia at screening: Q1 (Hb 100 < 130, absolute deficiency) and
  // Q2 (125 < 130, iron-restricted); Q3 is 140, Q4 has no Hb. Iron before surgery: Q1 only → 1 / 2.
  it('iron-before-surgery: 1 of 2', () => expect(m['iron-before-surgery']).toMatchObject({ numerator: 1, denominator: 2, percent: 50 }))
  // Post-operative iron recorded for Q1 only → 1 / 2.
  it('post-operative-iron: 1 of 2', () => expect(m['post-operative-iron']).toMatchObject({ numerator: 1, denominator: 2, percent: 50 }))
  // QS138 statement 2. Expected loss ≥ 500 mL: ORTHO (1000) = Q1, Q2, Q4; LAP (150) is out. Given: Q1 → 1 / 3.
  it('tranexamic-acid: 1 of 3', () => expect(m['tranexamic-acid']).toMatchObject({ numerator: 1, denominator: 3, percent: 33.3 }))
  // QS138 statement 3. Red-cell transfusions: Q1 ×2 (single, reassessed, post Hb) and Q2 ×1 (two units at once) → 2 / 3.
  it('reassessed-after-each-unit: ' + '2 of 3', () =>
    expect(m['reassessed-after-each-unit']).toMatchObject({ numerator: 2, denominator: 3, percent: 66.7 }),
  )
  // QS138 statement 4. Transfused (any component): Q1, Q2, Q3. Informed: Q1 (on the unit), Q3 (on the record) → 2 / 3.
  it('transfusion-information: ' + '2 of 3', () =>
    expect(m['transfusion-information']).toMatchObject({ numerator: 2, denominator: 3, percent: 66.7 }),
  )
  // First Hb to surgery: Q1 02-01→03-10 = 37 d, Q2 03-20→04-01 = 12 d, Q3 04-01→05-20 = 49 d, Q4 none → ≥ 28: Q1, Q3 = 2 / 4.
  it('screened-28-days-before: ' + '2 of 4', () =>
    expect(m['screened-28-days-before']).toMatchObject({ numerator: 2, denominator: 4, percent: 50 }),
  )
  // An Hb 14–45 days before: Q1 (37) only; Q2 (12) is too late, Q3 (49) too early → 1 / 4.
  it('screened-in-window-14-45: ' + '1 of 4', () =>
    expect(m['screened-in-window-14-45']).toMatchObject({ numerator: 1, denominator: 4, percent: 25 }),
  )
  // Last Hb on or before surgery: Q1 118, Q2 125, Q3 140 (Q4 none) → below 130: Q1, Q2 = 2 / 3.
  it('anaemic-on-day-of-surgery: ' + '2 of 3', () =>
    expect(m['anaemic-on-day-of-surgery']).toMatchObject({ numerator: 2, denominator: 3, percent: 66.7 }),
  )
  // Given red cells: Q1, Q2 (Q3 had platelets only) → 2 / 4.
  it('transfused: 2 of 4', () => expect(m.transfused).toMatchObject({ numerator: 2, denominator: 4, percent: 50 }))
  // Red-cell transfusions of exactly one unit: Q1's two of the three → 2 / 3.
  it('single-unit-red-cell-transfusions: ' + '2 of 3', () =>
    expect(m['single-unit-red-cell-transfusions']).toMatchObject({ numerator: 2, denominator: 3, percent: 66.7 }),
  )
  // Moved for anaemia: Q2 (Q3 moved for theatre capacity) → 1 / 4.
  it('postponed-for-anaemia: 1 of 4', () => expect(m['postponed-for-anaemia']).toMatchObject({ numerator: 1, denominator: 4, percent: 25 }))
  // Pre-transfusion Hb 75, 78, 70 → sorted 70, 75, 78 → median 75 g/L.
  it('median pre-transfusion Hb: 75 g/L of 3', () => expect(m['median-pre-transfusion-hb']).toMatchObject({ value: 75, denominator: 3 }))
  // Red-cell units 1 + 1 + 2 = 4 for 4 operated → 100 per 100.
  it('units per 100 operated: 4 ' + 'units for 4 → 100', () =>
    expect(m['units-per-100-operated']).toMatchObject({ numerator: 4, denominator: 4, value: 100 }),
  )

  it('when the QS138 measures are read, then each names its statement, one definition each, and the national audit figure', () => {
    for (const id of ['iron-before-surgery', 'tranexamic-acid', 'reassessed-after-each-unit', 'transfusion-information']) {
      expect(m[id]!.source).toMatch(/QS138 .*, statement \d/)
      expect(m[id]!.definition.numerator.length).toBeGreaterThan(10)
      expect(m[id]!.definition.denominator.length).toBeGreaterThan(10)
      expect(m[id]!.benchmark!.source).toMatch(/National Comparative Audit/)
    }
    // NHSBT 2023 audit: 617/908 (68 %), 900/1335 (67.5 %), 766/1205 (63.6 %); 2021 audit: 1032/1622 (64 %).
    expect(
      [m['iron-before-surgery']!, m['tranexamic-acid']!, m['reassessed-after-each-unit']!, m['transfusion-information']!].map(
        (x) => x.benchmark!.percent,
      ),
    ).toEqual([68, 67.5, 63.6, 64])
    expect(m['screened-in-window-14-45']!.source).toMatch(/Joint Commission/)
    expect(m['single-unit-red-cell-transfusions']!.source).toMatch(/Leahy et al., Transfusion 2017/)
  })
})

describe('GET /api/reports/quality — breakdowns, trend and who sees what', () => {
  it('when broken down by operation, surgeon and month, then each group carries its own counts', async () => {
    const body = await quality(asAdmin)
    const op = Object.fromEntries(body.byOperation.map((r) => [r.key, r.measures]))
    expect(op.ORTHO!['tranexamic-acid']).toMatchObject({ numerator: 1, denominator: 3 })
    expect(op.LAP!['tranexamic-acid']).toMatchObject({ numerator: 0, denominator: 0, percent: null })
    const s = Object.fromEntries(body.bySurgeon.map((r) => [r.name, r.measures]))
    expect(s['Surgeon Quality One']!.transfused).toMatchObject({ numerator: 2, denominator: 2 })
    expect(s['Surgeon Quality Two']!.transfused).toMatchObject({ numerator: 0, denominator: 2 })
    expect(body.trend.map((x) => [x.month, x.measures.transfused.numerator, x.measures.transfused.denominator])).toEqual([
      ['2025-03', 1, 1],
      ['2025-04', 1, 1],
      ['2025-05', 0, 1],
      ['2025-06', 0, 1],
    ])
  })

  it('when filtered to LAP, then only Q3 counts', async () => {
    expect(byId((await quality(asAdmin, '&procedureCode=LAP')).measures).transfused).toMatchObject({ numerator: 0, denominator: 1 })
  })

  it("when a surgeon asks, then only their own patients count, and another surgeon's figures are refused", async () => {
    const mine = await quality(asS1)
    expect(byId(mine.measures).transfused).toMatchObject({ numerator: 2, denominator: 2 })
    expect(mine.bySurgeon.map((r) => r.key)).toEqual([String(f.s1.id)])
    expect((await asS1.get(`/api/reports/quality?${PERIOD}&surgeonId=${f.s2.id}`)).status).toBe(403)
  })

  it('when an admin reads it, then there are figures and no patient in the answer', async () => {
    const res = await asAdmin.get(`/api/reports/quality?${PERIOD}`)
    const text = JSON.stringify(res.body)
    expect(text).not.toMatch(/TST\d{5}|Family\d|Given\d/) // factory MRNs and names
    expect(text).not.toMatch(new RegExp(`"referralId"`))
  })

  it.each([['from=2025-13-01'], ['from=2025-06-01&to=2025-01-01'], ['surgeonId=abc']])('when the query is %s, then 400', async (q) => {
    const res = await asAdmin.get(`/api/reports/quality?${q}`)
    expect(res.status).toBe(400)
  })

  it('when a nurse asks, then 403', async () => {
    const n = await makeStaff('nurse')
    const c = await new Client(t.app).mustSignIn(n.email, n.password)
    expect((await c.get(`/api/reports/quality?${PERIOD}`)).status).toBe(403)
  })
})

describe('GET /api/reports/quality/national-audit and the measures CSV', () => {
  it(
    'when a doctor exports, then one row per operated episode with the audit ' + 'fields, no patient identity, and the export is audited',
    async () => {
      const d = await makeStaff('doctor')
      const c = await new Client(t.app).mustSignIn(d.email, d.password)
      const res = await c.get(`/api/reports/quality/national-audit?${PERIOD}`)
      expect(res.status).toBe(200)
      expect(res.headers['content-type']).toMatch(/text\/csv/)
      const rows = parseCsv(res.text)
      expect(rows.map((r) => Number(r.episodeId))).toEqual([f.ids.q1, f.ids.q2, f.ids.q3, f.ids.q4])
      const q1 = rows[0]!
      expect(q1).toMatchObject({
        procedureCode: 'ORTHO',
        sex: 'female',
        surgeryDate: '2025-03-10',
        firstHbDate: '2025-02-01',
        firstHbGL: '100',
        daysFirstHbToSurgery: '37',
        screenedInWindow14to45: 'yes',
        ironDeficiencyAnaemia: 'yes',
        ironBeforeSurgery: 'yes',
        postOperativeIron: 'yes',
        surgeryDayHbGL: '118',
        anaemicOnDayOfSurgery: 'yes',
        tranexamicAcidGiven: 'yes',
        redCellTransfusions: '2',
        redCellUnits: '2',
        singleUnitTransfusions: '2',
        reassessedAfterEachUnit: '2',
        lowestPreTransfusionHbGL: '75',
        transfusionInformationGiven: 'yes',
      })
      // Factory patients are born 1960-05-15: 64 on 2025-03-10.
      expect(q1.ageAtSurgeryYears).toBe('64')
      expect(rows[1]).toMatchObject({
        postponementsForAnaemia: '1',
        redCellUnits: '2',
        singleUnitTransfusions: '0',
        tranexamicAcidGiven: 'no',
      })
      expect(res.text).not.toMatch(/TST\d{5}|Family\d|1960-05-15/)
      expect(await AuditEntry.count({ where: { action: 'export', entity: 'national-audit-export' } })).toBe(1)
    },
  )

  it('when an admin asks for the patient-level export, then 403; the measures CSV is theirs', async () => {
    expect((await asAdmin.get(`/api/reports/quality/national-audit?${PERIOD}`)).status).toBe(403)
    const csv = await asAdmin.get(`/api/reports/quality?${PERIOD}&format=csv`)
    expect(csv.status).toBe(200)
    const byRow = Object.fromEntries(parseCsv(csv.text).map((r) => [r.id, r]))
    expect(byRow['tranexamic-acid']).toMatchObject({ numerator: '1', denominator: '3', percent: '33.3', benchmarkPercent: '67.5' })
  })

  it('when an operation code starts like a formula, then the exported cell is neutralised', async () => {
    const p = await makeProcedure({ code: '=1+1' })
    const pt = await makePatient()
    const r = await makeReferral({ patientId: pt.id, procedureId: p.id, surgeonId: f.s1.id }, { stage: 'operated' })
    await Outcome.create({
      referralId: r.id,
      surgeryDate: '2025-07-01',
      bloodLossMl: 100,
      unitsTransfusedIntraOp: 0,
      unitsTransfusedPostOp: 0,
      unitsCrossmatched: 0,
      lowestHbGL: 120,
      dischargeHbGL: null,
      lengthOfStayDays: 1,
      complications: ['none'],
      recordedBy: null,
    })
    await factsAfterHandWrites()
    const c = await new Client(t.app).mustSignIn(f.s1.email, f.s1.password)
    const res = await c.get(`/api/reports/quality/national-audit?${PERIOD}`)
    const row = parseCsv(res.text).find((x) => Number(x.episodeId) === r.id)!
    expect(row.procedureCode).toBe("'=1+1")
    // The surgeon's export holds only their own episodes (Q1, Q2 and this one).
    expect(parseCsv(res.text)).toHaveLength(3)
  })
})

describe('voided and preliminary results in the quality measures', () => {
  it('when every operated episode also holds a voided and a preliminary Hb, then no measure, split or trend changes', async () => {
    const before = await quality(asAdmin)
    const outcomes = await Outcome.findAll({ raw: true })
    const added: number[] = []
    for (const o of outcomes) {
      const r = (await Referral.findByPk(o.referralId, { raw: true }))!
      const surgery = new Date(`${o.surgeryDate}T09:00:00.000Z`).getTime()
      const base = {
        referralId: r.id,
        patientId: r.patientId,
        analyte: 'hb' as const,
        unitCanonical: 'g/L',
        valueReported: null,
        unitReported: null,
        enteredBy: null,
        derivedFrom: null,
        source: 'hl7',
      }
      // 20 days before surgery (in the 14–45-day window, ≥ 28 days fails) and the day before: each would
      // change "screened in window", the first Hb and the surgery-day Hb if it counted.
      added.push(
        (await Result.create({ ...base, valueCanonical: 60, takenAt: new Date(surgery - 20 * 86_400_000), status: 'preliminary' })).id,
      )
      added.push(
        (
          await Result.create({
            ...base,
            valueCanonical: 61,
            takenAt: new Date(surgery - 86_400_000),
            voidedAt: new Date(),
            voidReason: 'deleted by the laboratory',
          })
        ).id,
      )
      added.push(
        (await Result.create({ ...base, valueCanonical: 62, takenAt: new Date(surgery - 400 * 86_400_000), status: 'preliminary' })).id,
      )
    }
    try {
      expect(added.length).toBeGreaterThan(0)
      await factsAfterHandWrites()
      expect(await quality(asAdmin)).toEqual(before)
    } finally {
      await Result.destroy({ where: { id: added } })
      await factsAfterHandWrites()
    }
  })
})
