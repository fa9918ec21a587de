import { beforeEach, describe, expect, it } from 'vitest'
import type { Client } from '../helpers/agent'
import type { StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { clinicTestApp } from '../helpers/clinicApp'
import { AuditEntry, IronProductRow } from '../../server/models/index'

const clinic = clinicTestApp()
let admin: Client
let doctor: Client
let surgeon: StaffFixture
beforeEach(async () => {
  const staff = await clinic.reset('admin', 'doctor', 'surgeon')
  surgeon = staff.surgeon
  admin = await clinic.signIn(staff.admin)
  doctor = await clinic.signIn(staff.doctor)
})

// Ferinject (ferric carboxymaltose) SmPC 4.2, Table 1 "Determination of the iron need" (MHRA,
// revision 2021, as reproduced at rxreasoner.com/monographs/ferinject/usage): Hb <10 / 10 to <14 /
// ≥14 g/dL against body weight below 35 kg / 35 to <70 kg / 70 kg and above:
// 500, 1,500, 2,000 mg; 500, 1,000, 1,500 mg; 500, 500, 500 mg.
const SMPC_TABLE = {
  weightBands: [
    { from: 0, below: 35 },
    { from: 35, below: 70 },
    { from: 70, below: null },
  ],
  hbBands: [
    { from: 0, below: 100 },
    { from: 100, below: 140 },
    { from: 140, below: null },
  ],
  needMg: [
    [500, 1500, 2000],
    [500, 1000, 1500],
    [500, 500, 500],
  ],
  source: 'Ferinject SmPC 4.2, Table 1 (MHRA 2021)',
}
const put = (code: string, body: object) => admin.put(`/api/formulary/${code}/dosing-table`, body)
const plan = async (productCode: string, weightKg: number, hbGL: number) => {
  const { referral } = await makeEpisode({ surgeonId: surgeon.id, weightKg, hb: [{ hbGL }] })
  const res = await doctor.post(`/api/referrals/${referral.id}/dose-plan`, { productCode })
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body
}

describe('the formulary dosing-table editor (admin)', () => {
  it('when the formulary is listed, then ferric carboxymaltose shows its table on file and that plans use it', async () => {
    const rows = (await admin.get('/api/formulary').expect(200)).body.rows as {
      code: string
      dosedByTable: boolean
      dosingTable: unknown
    }[]
    const fcm = rows.find((r) => r.code === 'ferric-carboxymaltose')!
    expect(fcm.dosedByTable).toBe(true)
    expect(fcm.dosingTable).toMatchObject({ weightBandsKg: [0, 35, 70], hbBandsGL: [0, 100, 140], needMg: SMPC_TABLE.needMg })
    expect(rows.find((r) => r.code === 'iron-sucrose')).toMatchObject({ dosedByTable: false, dosingTable: null })
  })

  it(
    'when an admin turns the table off, then the plan falls back to Ganzoni; turned on again, a 60 kg patient with Hb 95 g/L needs ' +
      '1500 mg (Ferinject SmPC 4.2 Table 1)',
    async () => {
      const off = await put('ferric-carboxymaltose', { dosedByTable: false, table: SMPC_TABLE })
      expect(off.status, JSON.stringify(off.body)).toBe(200)
      expect(off.body).toMatchObject({ dosedByTable: false, dosingTable: { needMg: SMPC_TABLE.needMg } })
      expect((await plan('ferric-carboxymaltose', 60, 95)).plan.method.method).toBe('ganzoni')

      expect((await put('ferric-carboxymaltose', { dosedByTable: true, table: SMPC_TABLE })).status).toBe(200)
      const on = await plan('ferric-carboxymaltose', 60, 95)
      expect(on.plan.method.method).toBe('product-table')
      expect(on.plan.deficitMg).toBe(1500)
      expect(on.methods.deficit).toMatch(/Ferinject SmPC 4\.2, Table 1 \(MHRA 2021\)/)
    },
  )

  it(
    'when an admin enters a table for another product, then plans read ' + 'it by band and the change is audited before and after',
    async () => {
      const res = await put('ferric-derisomaltose', {
        dosedByTable: true,
        table: { ...SMPC_TABLE, source: 'Local table for the test product' },
      })
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      // 72 kg falls in the ≥70 kg band, Hb 120 g/L in 100 to <140: 1500 mg in the table entered.
      expect((await plan('ferric-derisomaltose', 72, 120)).plan.deficitMg).toBe(1500)
      const audit = await AuditEntry.findOne({ where: { entity: 'iron-product', entityId: 'ferric-derisomaltose' }, raw: true })
      expect(audit).toMatchObject({
        action: 'update',
        before: { dosedByTable: false, dosingTable: null },
        after: { dosedByTable: true, dosingTable: { weightBandsKg: [0, 35, 70] } },
      })
    },
  )

  it.each([
    [
      'a gap between weight bands',
      {
        weightBands: [
          { from: 0, below: 35 },
          { from: 40, below: 70 },
          { from: 70, below: null },
        ],
      },
      'table.weightBands[1].from',
      /Weight band 2: starts at 40 kg but band 1 ends below 35 kg, a gap from 35 to 40 kg/,
    ],
    [
      'overlapping Hb bands',
      {
        hbBands: [
          { from: 0, below: 100 },
          { from: 90, below: 140 },
          { from: 140, below: null },
        ],
      },
      'table.hbBands[1].from',
      /Hb band 2: starts at 90 g\/L, inside band 1 .* overlap/,
    ],
    [
      'a first band that leaves the lightest patients out',
      {
        weightBands: [
          { from: 10, below: 35 },
          { from: 35, below: 70 },
          { from: 70, below: null },
        ],
      },
      'table.weightBands[0].from',
      /must start at 0 kg/,
    ],
    [
      'a closed last band',
      {
        weightBands: [
          { from: 0, below: 35 },
          { from: 35, below: 70 },
          { from: 70, below: 200 },
        ],
      },
      'table.weightBands[2].below',
      /last band must have no upper bound/,
    ],
    [
      'a band that ends before it starts',
      {
        hbBands: [
          { from: 0, below: 100 },
          { from: 100, below: 100 },
          { from: 100, below: null },
        ],
      },
      'table.hbBands[1].below',
      /must be above the lower bound/,
    ],
    [
      'a zero need',
      {
        needMg: [
          [500, 1500, 2000],
          [500, 0, 1500],
          [500, 500, 500],
        ],
      },
      'table.needMg[1][1]',
      /Hb 100 to <140 g\/L × weight 35 to <70 kg: the need must be a whole number from 1 to 20000 mg/,
    ],
    [
      'an absurd need',
      {
        needMg: [
          [500, 1500, 2000],
          [500, 1000, 1500],
          [500, 500, 99999],
        ],
      },
      'table.needMg[2][2]',
      /Hb ≥140 g\/L × weight ≥70 kg/,
    ],
    [
      'a missing row',
      {
        needMg: [
          [500, 1500, 2000],
          [500, 1000, 1500],
        ],
      },
      'table.needMg',
      /needs 3 rows/,
    ],
    [
      'a short row',
      {
        needMg: [
          [500, 1500, 2000],
          [500, 1000],
          [500, 500, 500],
        ],
      },
      'table.needMg[1]',
      /Row Hb 100 to <140 g\/L: give 3 values/,
    ],
  ])('when the table has %s, then 400 names the band or cell and nothing changes', async (_what, change, path, message) => {
    const before = (await IronProductRow.findOne({ where: { code: 'ferric-carboxymaltose' }, raw: true }))!
    const res = await put('ferric-carboxymaltose', { dosedByTable: true, table: { ...SMPC_TABLE, ...change } })
    expect(res.status, JSON.stringify(res.body)).toBe(400)
    expect(res.body.error.fields[path]).toMatch(message)
    const after = (await IronProductRow.findOne({ where: { code: 'ferric-carboxymaltose' }, raw: true }))!
    expect(after.dosingTable).toEqual(before.dosingTable)
    expect(after.updatedAt).toEqual(before.updatedAt)
  })

  it('when the body is nonsense (wrong types, nulls, no table while dosed by it), then 400, never 500', async () => {
    for (const body of [
      {},
      { dosedByTable: 'maybe' },
      { dosedByTable: true },
      { dosedByTable: true, table: null },
      { dosedByTable: true, table: 'x' },
      { dosedByTable: true, table: { ...SMPC_TABLE, weightBands: [null] } },
      { dosedByTable: true, table: { ...SMPC_TABLE, needMg: 'x' } },
      { dosedByTable: true, table: { ...SMPC_TABLE, needMg: [[null]] } },
      { dosedByTable: true, table: { ...SMPC_TABLE, hbBands: {} } },
      { dosedByTable: true, table: { ...SMPC_TABLE, source: '' } },
      {
        dosedByTable: true,
        table: { ...SMPC_TABLE, weightBands: Array.from({ length: 9 }, (_, i) => ({ from: i * 10, below: i === 8 ? null : i * 10 + 10 })) },
      },
    ]) {
      const res = await put('ferric-carboxymaltose', body)
      expect(res.status, `${JSON.stringify(body)} → ${JSON.stringify(res.body)}`).toBe(400)
      expect(res.body.error.message).toBeTruthy()
    }
  })

  it('when the product is oral or unknown, then the table is refused (400 naming the table) or 404', async () => {
    const oral = await put('ferrous-sulfate-oral', { dosedByTable: true, table: SMPC_TABLE })
    expect(oral.status).toBe(400)
    expect(oral.body.error.fields.dosingTable).toMatch(/oral product cannot be dosed by a cumulative-need table/)
    expect((await put('no-such-product', { dosedByTable: false, table: null })).status).toBe(404)
  })

  it('when an admin removes the table, then plans use Ganzoni and the list shows no table', async () => {
    expect((await put('ferric-carboxymaltose', { dosedByTable: false, table: null })).status).toBe(200)
    const rows = (await admin.get('/api/formulary').expect(200)).body.rows as { code: string; dosingTable: unknown }[]
    expect(rows.find((r) => r.code === 'ferric-carboxymaltose')!.dosingTable).toBeNull()
    expect((await plan('ferric-carboxymaltose', 60, 95)).plan.method.method).toBe('ganzoni')
  })

  it('when a doctor tries to change the table, then 403', async () => {
    expect((await doctor.put('/api/formulary/ferric-carboxymaltose/dosing-table', { dosedByTable: false, table: null })).status).toBe(403)
  })
})
