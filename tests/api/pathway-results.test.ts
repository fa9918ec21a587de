import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { hoursAgo, makeProcedure, registerThroughApi } from '../helpers/pathwayFactories'
import { AuditEntry, Referral, Result } from '../../server/models/index'

let t: TestApp
let nurse: StaffFixture
let surgeon: StaffFixture
let c: Client
let procedureCode: string
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  nurse = await makeStaff('nurse')
  surgeon = await makeStaff('surgeon')
  procedureCode = (await makeProcedure()).code
  c = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
})

async function episode(patient: Record<string, unknown> = {}) {
  return (await registerThroughApi(c, { procedureCode, surgeonId: surgeon.id }, patient)).referral as { id: number; version: number }
}
const post = (id: number, body: object) => c.post(`/api/referrals/${id}/results`, body)

describe('screening classification when results arrive', () => {
  it(
    'when a woman has Hb 125 g/L, then she is anaemic by the surgical threshold though WHO-normal (Muñoz 2017; WHO 2024 women 120 ' +
      'g/L)',
    async () => {
      const r = await episode({ sex: 'female' })
      const res = await post(r.id, { analyte: 'hb', value: 125, unit: 'g/L', takenAt: hoursAgo(2) })
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      expect(res.body.screening).toMatchObject({
        anaemic: true,
        severity: 'mild',
        criteria: 'surgical',
        thresholdGL: 130,
        proposedStage: 'clinic',
      })
      const detail = await c.get(`/api/referrals/${r.id}`).expect(200)
      expect(detail.body.screening).toMatchObject({ anaemic: true, latestHbGL: 125 })
    },
  )

  it('when ferritin is 25 µg/L, then the iron status is absolute deficiency and clinic is proposed (Muñoz 2017, from memory)', async () => {
    const r = await episode()
    await post(r.id, { analyte: 'hb', value: 140, unit: 'g/L', takenAt: hoursAgo(3) }).expect(201)
    const res = await post(r.id, { analyte: 'ferritin', value: 25, unit: 'µg/L', takenAt: hoursAgo(3) }).expect(201)
    expect(res.body.screening).toMatchObject({ anaemic: false, ironStatus: 'absolute-deficiency', proposedStage: 'clinic' })
  })

  it('when Hb is 135 g/L with ferritin 150 µg/L and TSAT 25 %, then fit for theatre is proposed (Muñoz 2017 cut-offs)', async () => {
    const r = await episode({ sex: 'male' })
    const at = hoursAgo(5)
    await post(r.id, { analyte: 'hb', value: 135, unit: 'g/L', takenAt: at }).expect(201)
    await post(r.id, { analyte: 'ferritin', value: 150, unit: 'ng/mL', takenAt: at }).expect(201)
    const res = await post(r.id, { analyte: 'tsat', value: 25, unit: '%', takenAt: at }).expect(201)
    expect(res.body.screening).toMatchObject({ anaemic: false, ironStatus: 'replete', proposedStage: 'cleared' })
    const row = await Referral.findByPk(r.id)
    expect(row).toMatchObject({ proposedStage: 'cleared', ironStatus: 'replete', anaemic: false, latestHbGL: 135 })
  })

  it('when only an Hb above the threshold exists, then nothing is proposed until iron studies arrive', async () => {
    const r = await episode()
    const res = await post(r.id, { analyte: 'hb', value: 142, unit: 'g/L', takenAt: hoursAgo(1) }).expect(201)
    expect(res.body.screening).toMatchObject({ anaemic: false, ironStatus: null, proposedStage: null })
  })

  it('when a later Hb is entered first and an older one after, then the latest by time taken is the one on the episode', async () => {
    const r = await episode()
    await post(r.id, { analyte: 'hb', value: 118, unit: 'g/L', takenAt: hoursAgo(1) }).expect(201)
    const res = await post(r.id, { analyte: 'hb', value: 140, unit: 'g/L', takenAt: hoursAgo(48) }).expect(201)
    expect(res.body.screening.latestHbGL).toBe(118)
  })

  it('then adding a result does not change the referral version (it is derived data, not an edit)', async () => {
    const r = await episode()
    const res = await post(r.id, { analyte: 'hb', value: 110, unit: 'g/L', takenAt: hoursAgo(1) }).expect(201)
    expect(res.body.referral.version).toBe(r.version)
  })
})

describe('units and derived values', () => {
  it('when Hb is 12.5 g/dL, then it is stored as 125 g/L with the reported value kept (×10)', async () => {
    const r = await episode()
    const res = await post(r.id, { analyte: 'hb', value: 12.5, unit: 'g/dL', takenAt: hoursAgo(1), unitConfirmed: true }).expect(201)
    expect(res.body.result).toMatchObject({ value: 125, unit: 'g/L', valueReported: 12.5, unitReported: 'g/dL', source: 'manual' })
  })

  it('when Hb is 8.0 mmol/L, then it is 128.9 g/L (per Fe monomer, ×0.6206; clinical reference §7)', async () => {
    const r = await episode()
    const res = await post(r.id, { analyte: 'hb', value: 8.0, unit: 'mmol/L', takenAt: hoursAgo(1), unitConfirmed: true }).expect(201)
    expect(res.body.result.value).toBeCloseTo(128.9, 1)
  })

  it('when CRP is typed as 2.5 mg/dL, then it is stored as 25 mg/L (1 mg/dL = 10 mg/L)', async () => {
    const r = await episode()
    const res = await post(r.id, { analyte: 'crp', value: 2.5, unit: 'mg/dL', takenAt: hoursAgo(1) }).expect(201)
    expect(res.body.result).toMatchObject({ value: 25, unit: 'mg/L', valueReported: 2.5, unitReported: 'mg/dL' })
  })

  it(
    'when creatinine is 1.2 mg/dL in a 60-year-old man, then it is 106.1 µmol/L and eGFR 69.2 is derived (×88.4; CKD-EPI 2021, ' +
      'reference §10)',
    async () => {
      const today = new Date()
      const dob = `${today.getFullYear() - 61}-01-01`
      const r = await episode({ sex: 'male', dateOfBirth: dob })
      // Taken on a day when he is 60 (between his 60th and 61st birthdays).
      const takenAt = new Date(`${today.getFullYear() - 1}-06-01T09:00:00Z`).toISOString()
      const res = await post(r.id, { analyte: 'creatinine', value: 1.2, unit: 'mg/dL', takenAt }).expect(201)
      expect(res.body.result).toMatchObject({ unit: 'µmol/L' })
      expect(res.body.result.value).toBeCloseTo(106.08, 2)
      expect(res.body.derived).toHaveLength(1)
      expect(res.body.derived[0]).toMatchObject({ analyte: 'egfr', source: 'derived', derivedFrom: [res.body.result.id] })
      expect(res.body.derived[0].value).toBeCloseTo(69.2, 1)
    },
  )

  it('when iron 10 µmol/L and TIBC 60 µmol/L come from the same sample, then TSAT 16.7 % is derived (reference §7)', async () => {
    const r = await episode()
    const at = hoursAgo(4)
    await post(r.id, { analyte: 'iron', value: 10, unit: 'umol/L', takenAt: at }).expect(201)
    const res = await post(r.id, { analyte: 'tibc', value: 60, unit: 'µmol/L', takenAt: at }).expect(201)
    expect(res.body.derived[0]).toMatchObject({ analyte: 'tsat', unit: '%', value: 16.7, source: 'derived' })
  })

  it(
    'when iron 56 µg/dL and transferrin 2.4 g/L come from one sample, then TSAT is 16.65 % ±0.05 (iron 10.03 µmol/L, TIBC 60.24; ' +
      'reference §7, 25.1 factor from memory)',
    async () => {
      const r = await episode()
      const at = hoursAgo(4)
      const iron = await post(r.id, { analyte: 'iron', value: 56, unit: 'µg/dL', takenAt: at }).expect(201)
      expect(iron.body.result.value).toBeCloseTo(10.03, 2)
      expect(iron.body.derived).toEqual([])
      const res = await post(r.id, { analyte: 'transferrin', value: 2.4, unit: 'g/L', takenAt: at }).expect(201)
      // 10.03 / 60.24 = 16.65 %, stored to one decimal.
      expect(Math.abs(res.body.derived[0].value - 16.65)).toBeLessThanOrEqual(0.051)
    },
  )

  it('when iron and transferrin come from different samples, then no TSAT is derived', async () => {
    const r = await episode()
    await post(r.id, { analyte: 'iron', value: 10, unit: 'µmol/L', takenAt: hoursAgo(30) }).expect(201)
    const res = await post(r.id, { analyte: 'transferrin', value: 2.4, unit: 'g/L', takenAt: hoursAgo(2) }).expect(201)
    expect(res.body.derived).toEqual([])
  })

  it('when the lab reported a TSAT for the sample, then no second TSAT is derived', async () => {
    const r = await episode()
    const at = hoursAgo(4)
    await post(r.id, { analyte: 'tsat', value: 18, unit: '%', takenAt: at }).expect(201)
    await post(r.id, { analyte: 'iron', value: 10, unit: 'µmol/L', takenAt: at }).expect(201)
    const res = await post(r.id, { analyte: 'tibc', value: 60, unit: 'µmol/L', takenAt: at }).expect(201)
    expect(res.body.derived).toEqual([])
    expect(await Result.count({ where: { referralId: r.id, analyte: 'tsat' } })).toBe(1)
  })
})

describe('bad results are refused and nothing is written', () => {
  async function counts(referralId: number) {
    return { results: await Result.count(), audit: await AuditEntry.count(), referral: await Referral.findByPk(referralId, { raw: true }) }
  }
  const cases: [string, Record<string, unknown>, string, RegExp][] = [
    ['Hb 2 g/L (implausible)', { analyte: 'hb', value: 2, unit: 'g/L' }, 'value', /between 20 and 250 g\/L.*looks like g\/dL/],
    ['Hb 12.5 sent as g/L (a g/dL value in the wrong unit)', { analyte: 'hb', value: 12.5, unit: 'g/L' }, 'value', /looks like g\/dL/],
    ['an unknown unit for Hb', { analyte: 'hb', value: 125, unit: 'mg/dL' }, 'unit', /g\/L, g\/dL, mmol\/L/],
    ['an unknown analyte', { analyte: 'glucose', value: 5, unit: 'mmol/L' }, 'analyte', /analyte must be one of/],
    ['a value that is not a number', { analyte: 'hb', value: 'low', unit: 'g/L' }, 'value', /number/],
    [
      'Hb 8.0 in mmol/L without its unit confirmed (it fits g/dL too)',
      { analyte: 'hb', value: 8.0, unit: 'mmol/L' },
      'unitConfirmed',
      /fits both g\/dL \(2–25\) and mmol\/L \(1\.2–15\.5\).*80 g\/L as g\/dL but 128\.\d g\/L as mmol\/L/,
    ],
    [
      'TSAT typed as a fraction (0.15)',
      { analyte: 'tsat', value: 0.15, unit: '%' },
      'value',
      /between 1 and 100 % \(got 0\.15\); it looks like a fraction: enter it as a percentage \(15 %\)/,
    ],
    ['TSAT above 100 %', { analyte: 'tsat', value: 120, unit: '%' }, 'value', /between 1 and 100 %/],
    ['B12 in pmol/L (no sourced conversion, so not accepted)', { analyte: 'b12', value: 300, unit: 'pmol/L' }, 'unit', /ng\/L/],
  ]
  for (const [what, body, field, message] of cases) {
    it(`when the result is ${what}, then 400 names ${field} and nothing changes`, async () => {
      const r = await episode()
      const before = await counts(r.id)
      const res = await post(r.id, { takenAt: hoursAgo(1), ...body })
      expect(res.status).toBe(400)
      expect(res.body.error.fields[field]).toMatch(message)
      expect(await counts(r.id)).toEqual(before)
    })
  }

  it('when takenAt is in the future, then 400 names takenAt and nothing changes', async () => {
    const r = await episode()
    const before = await counts(r.id)
    const res = await post(r.id, { analyte: 'hb', value: 120, unit: 'g/L', takenAt: new Date(Date.now() + 86_400_000).toISOString() })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.takenAt).toMatch(/future/)
    expect(await counts(r.id)).toEqual(before)
  })

  it('when serum iron exceeds the iron-binding capacity of the same sample, then 400 and neither value is kept', async () => {
    const r = await episode()
    const at = hoursAgo(2)
    await post(r.id, { analyte: 'iron', value: 80, unit: 'µmol/L', takenAt: at }).expect(201)
    const before = await counts(r.id)
    const res = await post(r.id, { analyte: 'tibc', value: 40, unit: 'µmol/L', takenAt: at })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.value).toMatch(/must not exceed/)
    expect(await counts(r.id)).toEqual(before)
  })

  it('when the referral is closed, then a new result is refused with 422', async () => {
    const r = await episode()
    await Referral.update({ stage: 'closed' }, { where: { id: r.id } })
    const res = await post(r.id, { analyte: 'hb', value: 120, unit: 'g/L', takenAt: hoursAgo(1) })
    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('closed_read_only')
  })
})

describe('reading results', () => {
  it('then the list holds entered and derived values newest first, with who entered them, and the read is audited', async () => {
    const r = await episode()
    await post(r.id, { analyte: 'hb', value: 120, unit: 'g/L', takenAt: hoursAgo(10) }).expect(201)
    await post(r.id, { analyte: 'hb', value: 124, unit: 'g/L', takenAt: hoursAgo(1) }).expect(201)
    const res = await c.get(`/api/referrals/${r.id}/results`).expect(200)
    expect(res.body.rows.map((x: { value: number }) => x.value)).toEqual([124, 120])
    expect(res.body.rows[0].enteredBy).toMatchObject({ id: nurse.id })
    expect(await AuditEntry.count({ where: { action: 'view', entity: 'results', entityId: String(r.id) } })).toBe(1)
  })

  it('then a result write is audited with the screening outcome before and after', async () => {
    const r = await episode()
    const res = await post(r.id, { analyte: 'hb', value: 100, unit: 'g/L', takenAt: hoursAgo(1) }).expect(201)
    const audit = await AuditEntry.findOne({
      where: { action: 'create', entity: 'result', entityId: String(res.body.result.id) },
      raw: true,
    })
    expect(audit).toMatchObject({ userId: nurse.id, after: { screening: { anaemic: true, severity: 'moderate' } } })
  })
})
