import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { makeOrdersFixture, type OrdersFixture } from './quality-cancellations-fixture'

let t: TestApp
let f: OrdersFixture
let asDoctor: Client

const PERIOD = 'from=2025-01-01&to=2025-12-31'
type Figure = { numerator: number; denominator: number; percent: number | null }
type M = Figure & { id: string; title: string; definition: { numerator: string; denominator: string }; source: string }
type Body = {
  measures: M[]
  byOperation: { key: string; measures: Record<string, Figure> }[]
  bySurgeon: { name: string; measures: Record<string, Figure> }[]
  trend: { month: string; measures: Record<string, Figure> }[]
}

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  f = await makeOrdersFixture()
  const d = await makeStaff('doctor')
  asDoctor = await new Client(t.app).mustSignIn(d.email, d.password)
})
afterAll(async () => {
  await t.close()
})

async function quality(c: Client, extra = ''): Promise<Body> {
  const res = await c.get(`/api/reports/quality?${PERIOD}${extra}`)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body as Body
}
const measure = (b: Body, id: string) => b.measures.find((m) => m.id === id)!

describe('cancellations and blood orders in the quality report (fixture in quality-cancellations-fixture.ts)', () => {
  // Events with their day in 2025: operated A, B, C, D (4) and cancellations of B, F, G (3) = 7.
  // E (2024) and H (2026) are outside. Cancelled for anaemia: B's and G's → 2 / 7 = 28.6 %.
  it('cancelled-for-anaemia: 2 of 7 planned operations', async () => {
    expect(measure(await quality(asDoctor), 'cancelled-for-anaemia')).toMatchObject({ numerator: 2, denominator: 7, percent: 28.6 })
  })

  // Schedule group and screen, no antibodies: A and B (C has antibodies, D's schedule is crossmatch, E is 2024).
  // Crossmatched: B → 1 / 2.
  it('crossmatch-against-schedule: 1 of 2', async () => {
    expect(measure(await quality(asDoctor), 'crossmatch-against-schedule')).toMatchObject({ numerator: 1, denominator: 2, percent: 50 })
  })

  // Operated in 2025: A, B, C, D. Moved for anaemia: A; cancelled for anaemia before going ahead: B → 2 / 4.
  it('postponed-for-anaemia counts a move and a cancellation for anaemia: 2 of 4', async () => {
    expect(measure(await quality(asDoctor), 'postponed-for-anaemia')).toMatchObject({ numerator: 2, denominator: 4, percent: 50 })
  })

  it('when the definitions are read, then each says what it counts and names its source', async () => {
    const b = await quality(asDoctor)
    const c = measure(b, 'cancelled-for-anaemia')
    expect(c.definition.numerator).toMatch(/Cancelled for anaemia/)
    expect(c.definition.denominator).toMatch(/went ahead .* or were cancelled/)
    const x = measure(b, 'crossmatch-against-schedule')
    expect(x.definition.denominator).toMatch(/group and screen, leaving out patients with red-cell antibodies/)
    expect(x.source).toMatch(/Frank et al., Anesthesiology 2013;118\(6\):1286/)
    expect(measure(b, 'postponed-for-anaemia').definition.numerator).toMatch(/moved .* or whose planned operation was cancelled/)
  })

  // By month (the cancelled date or the surgery date): March A, B, B's cancellation (1 of 3); April C, D (0 of 2);
  // May F (0 of 1); June G (1 of 1).
  it('when broken down by month, operation and surgeon, then cancellations fall where their planned day was', async () => {
    const b = await quality(asDoctor)
    expect(
      b.trend.map((x) => [x.month, x.measures['cancelled-for-anaemia']!.numerator, x.measures['cancelled-for-anaemia']!.denominator]),
    ).toEqual([
      ['2025-03', 1, 3],
      ['2025-04', 0, 2],
      ['2025-05', 0, 1],
      ['2025-06', 1, 1],
    ])
    // GS: A, B, C operated + B's and F's cancellations = 5, anaemia B's → 1 / 5. XM: D + G's cancellation, anaemia G → 1 / 2.
    const op = Object.fromEntries(b.byOperation.map((r) => [r.key, r.measures]))
    expect(op.GS!['cancelled-for-anaemia']).toMatchObject({ numerator: 1, denominator: 5 })
    expect(op.XM!['cancelled-for-anaemia']).toMatchObject({ numerator: 1, denominator: 2 })
    expect(op.XM!['crossmatch-against-schedule']).toMatchObject({ numerator: 0, denominator: 0, percent: null })
    // S1: A, B + B's and G's cancellations = 4, anaemia 2. S2: C, D + F's = 3, anaemia 0.
    const s = Object.fromEntries(b.bySurgeon.map((r) => [r.name, r.measures]))
    expect(s['Surgeon Orders One']!['cancelled-for-anaemia']).toMatchObject({ numerator: 2, denominator: 4 })
    expect(s['Surgeon Orders Two']!['cancelled-for-anaemia']).toMatchObject({ numerator: 0, denominator: 3 })
  })

  it('when a surgeon asks, then only their own cancellations and orders count', async () => {
    const c = await new Client(t.app).mustSignIn(f.s1.email, f.s1.password)
    const b = await quality(c)
    expect(measure(b, 'cancelled-for-anaemia')).toMatchObject({ numerator: 2, denominator: 4 })
    expect(measure(b, 'crossmatch-against-schedule')).toMatchObject({ numerator: 1, denominator: 2 })
  })

  it('when filtered to XM, then only D and G count', async () => {
    const b = await quality(asDoctor, '&procedureCode=XM')
    expect(measure(b, 'cancelled-for-anaemia')).toMatchObject({ numerator: 1, denominator: 2 })
    expect(measure(b, 'crossmatch-against-schedule')).toMatchObject({ numerator: 0, denominator: 0, percent: null })
  })

  it('when the measures CSV is asked for, then the new measures are rows in it', async () => {
    const res = await asDoctor.get(`/api/reports/quality?${PERIOD}&format=csv`)
    expect(res.status).toBe(200)
    expect(res.text).toMatch(/cancelled-for-anaemia,.*,2,7,28\.6/)
  })
})
