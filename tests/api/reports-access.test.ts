import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { asCsvCell, makeReportFixture, parseCsv, type ReportFixture } from './reports-fixture'

let t: TestApp
let f: ReportFixture
let asS1: Client
let asDoctor: Client
let asNurse: Client

const PERIOD = 'from=2025-01-01&to=2025-12-31'

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  f = await makeReportFixture(t.sequelize)
  const d = await makeStaff('doctor')
  const n = await makeStaff('nurse')
  asS1 = await new Client(t.app).mustSignIn(f.s1.email, f.s1.password)
  asDoctor = await new Client(t.app).mustSignIn(d.email, d.password)
  asNurse = await new Client(t.app).mustSignIn(n.email, n.password)
})
afterAll(async () => {
  await t.close()
})

describe('who sees which figures', () => {
  it("when a surgeon asks for another surgeon's figures, then 403 on every report", async () => {
    for (const name of ['funnel', 'haemoglobin', 'transfusion', 'waiting-times', 'blood-ordering']) {
      expect((await asS1.get(`/api/reports/${name}?${PERIOD}&surgeonId=${f.s2.id}`)).status, name).toBe(403)
    }
  })

  it('when a surgeon asks without a surgeon, then only their own episodes count (E1, E2)', async () => {
    const res = await asS1.get(`/api/reports/funnel?${PERIOD}`)
    expect(res.status).toBe(200)
    expect(res.body.filters.surgeonId).toBe(f.s1.id)
    const referred = res.body.tables.funnel.rows.find((r: { step: string }) => r.step === 'referred')
    expect(referred.count).toBe(2)
    const hip = (await asS1.get(`/api/reports/blood-ordering?${PERIOD}`)).body.tables.bloodOrdering.rows.map(
      (r: { procedureCode: string }) => r.procedureCode,
    )
    expect(hip).toEqual(['KNEE']) // S2's HIP episode is not in S1's audit
    const bySurgeon = (await asS1.get(`/api/reports/transfusion?${PERIOD}`)).body.tables.bySurgeon.rows
    expect(bySurgeon.every((r: { groupKey: string }) => r.groupKey === String(f.s1.id))).toBe(true)
  })

  it('when a doctor asks for one surgeon, then that surgeon only; when a nurse asks, then 403', async () => {
    const res = await asDoctor.get(`/api/reports/funnel?${PERIOD}&surgeonId=${f.s2.id}`)
    expect(res.body.tables.funnel.rows.find((r: { step: string }) => r.step === 'referred').count).toBe(2) // E3, E4
    expect((await asNurse.get(`/api/reports/funnel?${PERIOD}`)).status).toBe(403)
  })
})

describe('CSV downloads', () => {
  it.each([
    ['funnel', 'funnel'],
    ['waiting-times', 'waitingTimes'],
    ['haemoglobin', 'distribution'],
    ['haemoglobin', 'riseByProduct'],
    ['transfusion', 'byOperation'],
    ['transfusion', 'bySurgeon'],
    ['blood-ordering', 'bloodOrdering'],
  ])('when %s table %s is downloaded, then it is an attachment whose rows equal the JSON table', async (name, table) => {
    const json = (await asDoctor.get(`/api/reports/${name}?${PERIOD}`)).body.tables[table]
    const res = await asDoctor.get(`/api/reports/${name}?${PERIOD}&format=csv&table=${table}`)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toMatch(/^text\/csv/)
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="?[\w.-]+\.csv"?$/)
    const rows = parseCsv(res.text)
    expect(rows.length).toBeGreaterThan(0)
    expect(rows).toEqual(
      json.rows.map((r: Record<string, unknown>) =>
        Object.fromEntries(json.columns.map((c: { key: string }) => [c.key, asCsvCell(r[c.key])])),
      ),
    )
  })

  it('when a surgeon downloads a CSV for another surgeon, then 403', async () => {
    expect((await asS1.get(`/api/reports/funnel?${PERIOD}&format=csv&surgeonId=${f.s2.id}`)).status).toBe(403)
  })
})
