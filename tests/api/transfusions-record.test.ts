import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { AuditEntry, Outcome, Transfusion } from '../../server/models/index'
import { todayIso } from '../../shared/pathway'

let t: TestApp
let surgeon: StaffFixture
let asNurse: Client
let asOtherSurgeon: Client

beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  surgeon = await makeStaff('surgeon')
  const other = await makeStaff('surgeon')
  const n = await makeStaff('nurse')
  asNurse = await new Client(t.app).mustSignIn(n.email, n.password)
  asOtherSurgeon = await new Client(t.app).mustSignIn(other.email, other.password)
})

/** An operated episode with its post-operative record (surgery today, 4 days' stay). */
async function operated(o: { specialty?: string; withOutcome?: boolean } = {}) {
  const e = await makeEpisode({ surgeonId: surgeon.id, referral: { stage: 'operated' } })
  if (o.specialty) await e.procedure.update({ specialty: o.specialty })
  if (o.withOutcome !== false) {
    const res = await asNurse.post(`/api/referrals/${e.referral.id}/outcome`, {
      surgeryDate: todayIso(),
      bloodLossMl: 700,
      unitsCrossmatched: 2,
      lowestHbGL: 72,
      dischargeHbGL: 95,
      lengthOfStayDays: 4,
      complications: ['none'],
      version: 1,
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
  }
  return e.referral.id
}

const unit = (o: Record<string, unknown> = {}) => ({
  givenAt: new Date(Date.now() - 60_000).toISOString(),
  component: 'red-cells',
  units: 1,
  preTransfusionHbGL: 68,
  reassessedBeforeNext: true,
  postTransfusionHbGL: 79,
  informationGiven: true,
  productCodes: ['E0336V00'],
  ...o,
})

describe('POST /api/referrals/:id/transfusions', () => {
  it(
    'when a red-cell unit below the threshold is recorded, then 201, the threshold is kept and the post-operative record counts the ' +
      'unit',
    async () => {
      const id = await operated({ specialty: 'Colorectal surgery' })
      const res = await asNurse.post(`/api/referrals/${id}/transfusions`, unit())
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      // Colorectal, no cardiovascular disease: 70 g/L (AABB 2023, stable adult inpatient).
      expect(res.body.transfusion).toMatchObject({
        component: 'red-cells',
        units: 1,
        phase: 'after-surgery',
        thresholdGL: 70,
        aboveThreshold: false,
        reassessedAfterEachUnit: true,
      })
      expect(res.body.redCellUnits).toEqual({ beforeSurgery: 0, duringSurgery: 0, afterSurgery: 1 })
      expect((await Outcome.findOne({ where: { referralId: id } }))!.unitsTransfusedPostOp).toBe(1)
      expect(await AuditEntry.count({ where: { entity: 'transfusion', action: 'create' } })).toBe(1)
      const list = await asNurse.get(`/api/referrals/${id}/transfusions`)
      expect(list.status).toBe(200)
      expect(list.body.transfusions).toHaveLength(1)
      expect(list.body.threshold.thresholdGL).toBe(70)
    },
  )

  it('when two units are given during surgery, then the record counts them as intra-operative units', async () => {
    const id = await operated()
    const res = await asNurse.post(
      `/api/referrals/${id}/transfusions`,
      unit({ units: 2, phase: 'during-surgery', productCodes: ['E0336V00', 'E0336V00'] }),
    )
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.transfusion.reassessedAfterEachUnit).toBe(false) // two units at once: not single-unit
    expect((await Outcome.findOne({ where: { referralId: id } }))!.unitsTransfusedIntraOp).toBe(2)
  })

  // Each rule refuses with the field named and writes nothing.
  it.each([
    ['red cells without a pre-transfusion Hb', {}, { preTransfusionHbGL: null }, 400, 'preTransfusionHbGL'],
    ['zero units', {}, { units: 0 }, 400, 'units'],
    ['21 units', {}, { units: 21 }, 400, 'units'],
    ['1.5 units', {}, { units: 1.5 }, 400, 'units'],
    ['an unknown component', {}, { component: 'whole-blood' }, 400, 'component'],
    ['a product code that is not ISBT 128', {}, { productCodes: ['=<E0336V00'] }, 400, 'productCodes[0]'],
    ['more product codes than units', {}, { productCodes: ['E0336V00', 'E0336V00'] }, 422, 'productCodes'],
    // Orthopaedics: 80 g/L (AABB 2023); 85 is above it, so a reason is needed.
    ['an Hb above the orthopaedic threshold without a reason', { specialty: 'Orthopaedics' }, { preTransfusionHbGL: 85 }, 422, 'reason'],
    // Cardiac surgery: 75 g/L (AABB 2023).
    ['an Hb of 78 g/L in cardiac surgery without a reason', { specialty: 'Cardiac surgery' }, { preTransfusionHbGL: 78 }, 422, 'reason'],
    ['a time in the future', {}, { givenAt: new Date(Date.now() + 3_600_000).toISOString() }, 400, 'givenAt'],
    ['a time that is not a date', {}, { givenAt: 'later' }, 400, 'givenAt'],
    ['no answer on reassessment', {}, { reassessedBeforeNext: undefined }, 400, 'reassessedBeforeNext'],
    ['no answer on information', {}, { informationGiven: 'perhaps' }, 400, 'informationGiven'],
  ])('when %s, then it is refused naming the field and nothing changes', async (_name, ep, patch, status, field) => {
    const id = await operated(ep)
    const res = await asNurse.post(`/api/referrals/${id}/transfusions`, unit(patch))
    expect(res.status, JSON.stringify(res.body)).toBe(status)
    expect(Object.keys(res.body.error.fields ?? {})).toContain(field)
    expect(await Transfusion.count()).toBe(0)
    expect((await Outcome.findOne({ where: { referralId: id } }))!.unitsTransfusedPostOp).toBe(0)
  })

  it('when the Hb is above the threshold and a reason is given, then it is saved and flagged above the threshold', async () => {
    const id = await operated({ specialty: 'Orthopaedics' })
    const res = await asNurse.post(
      `/api/referrals/${id}/transfusions`,
      unit({ preTransfusionHbGL: 85, reason: 'Symptomatic: chest pain on mobilising' }),
    )
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.transfusion).toMatchObject({ thresholdGL: 80, aboveThreshold: true })
  })

  it('when the Hb equals the threshold, then no reason is needed (only above it)', async () => {
    const id = await operated({ specialty: 'Orthopaedics' })
    expect((await asNurse.post(`/api/referrals/${id}/transfusions`, unit({ preTransfusionHbGL: 80 }))).status).toBe(201)
  })

  it('when platelets are given, then no pre-transfusion Hb is needed', async () => {
    const id = await operated()
    const res = await asNurse.post(
      `/api/referrals/${id}/transfusions`,
      unit({ component: 'platelets', preTransfusionHbGL: null, productCodes: [] }),
    )
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect((await Outcome.findOne({ where: { referralId: id } }))!.unitsTransfusedPostOp).toBe(0) // red cells only
  })

  it('when the unit is dated after discharge, then 422 names givenAt', async () => {
    const id = await operated({ withOutcome: false })
    // Referred 10 days ago, operated 8 days ago, 2 days' stay: discharged 6 days ago.
    await t.sequelize.query('UPDATE referrals SET created_at = DATE_SUB(NOW(), INTERVAL 10 DAY) WHERE id = ?', { replacements: [id] })
    await Outcome.create({
      referralId: id,
      surgeryDate: new Date(Date.now() - 8 * 86_400_000).toISOString().slice(0, 10),
      bloodLossMl: 500,
      unitsTransfusedIntraOp: 0,
      unitsTransfusedPostOp: 0,
      unitsCrossmatched: 0,
      lowestHbGL: 80,
      dischargeHbGL: null,
      lengthOfStayDays: 2,
      complications: ['none'],
      recordedBy: null,
    })
    const res = await asNurse.post(`/api/referrals/${id}/transfusions`, unit())
    expect(res.status).toBe(422)
    expect(Object.keys(res.body.error.fields)).toContain('givenAt')
  })

  it('when the post-operative record is missing, then 422 outcome_required', async () => {
    const id = await operated({ withOutcome: false })
    const res = await asNurse.post(`/api/referrals/${id}/transfusions`, unit())
    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('outcome_required')
  })

  it("when another surgeon's patient is asked for, then 403 and nothing is written", async () => {
    const id = await operated()
    expect((await asOtherSurgeon.post(`/api/referrals/${id}/transfusions`, unit())).status).toBe(403)
    expect((await asOtherSurgeon.get(`/api/referrals/${id}/transfusions`)).status).toBe(403)
    expect(await Transfusion.count()).toBe(0)
  })
})

describe('correcting and voiding a transfusion', () => {
  it('when a unit is corrected with a reason, then the row changes, the counts follow and the audit keeps the reason', async () => {
    const id = await operated()
    const made = await asNurse.post(`/api/referrals/${id}/transfusions`, unit())
    const tid = made.body.transfusion.id
    const noReason = await asNurse.put(`/api/referrals/${id}/transfusions/${tid}`, unit({ units: 2, productCodes: [] }))
    expect(noReason.status).toBe(400)
    expect(Object.keys(noReason.body.error.fields)).toContain('changeReason')
    const res = await asNurse.put(
      `/api/referrals/${id}/transfusions/${tid}`,
      unit({ units: 2, productCodes: [], changeReason: 'Two units were given, not one' }),
    )
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.redCellUnits.afterSurgery).toBe(2)
    const audit = await AuditEntry.findOne({ where: { entity: 'transfusion', action: 'update' } })
    expect(audit!.after).toMatchObject({ units: 2, changeReason: 'Two units were given, not one' })
  })

  it('when a unit is voided with a reason, then it stays listed as voided, counts nowhere and cannot be voided twice', async () => {
    const id = await operated()
    const tid = (await asNurse.post(`/api/referrals/${id}/transfusions`, unit())).body.transfusion.id
    expect((await asNurse.post(`/api/referrals/${id}/transfusions/${tid}/void`, {})).status).toBe(400)
    const res = await asNurse.post(`/api/referrals/${id}/transfusions/${tid}/void`, { reason: 'Recorded on the wrong patient' })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.transfusion.voided.reason).toBe('Recorded on the wrong patient')
    expect((await Outcome.findOne({ where: { referralId: id } }))!.unitsTransfusedPostOp).toBe(0)
    expect(await AuditEntry.count({ where: { entity: 'transfusion', action: 'void' } })).toBe(1)
    const again = await asNurse.post(`/api/referrals/${id}/transfusions/${tid}/void`, { reason: 'again' })
    expect(again.status).toBe(422)
    expect(again.body.error.code).toBe('voided')
  })
})
