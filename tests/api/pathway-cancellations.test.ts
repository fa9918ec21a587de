import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { AuditEntry, Referral, SurgeryDateChange } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

let t: TestApp
let nurse: StaffFixture
let surgeon: StaffFixture
let c: Client
let referralId: number
let planned: string

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
  const p = await makeProcedure()
  const pt = await makePatient()
  planned = addDays(todayIso(), 20)
  referralId = (
    await makeReferral({ patientId: pt.id, procedureId: p.id, surgeonId: surgeon.id }, { stage: 'treating', plannedSurgeryDate: planned })
  ).id
  c = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
})

const cancel = (client: Client, body: Record<string, unknown>) => client.post(`/api/referrals/${referralId}/cancellation`, body)
const nothingChanged = async () => {
  expect(await SurgeryDateChange.count()).toBe(0)
  expect((await Referral.findByPk(referralId))!.version).toBe(1)
}

describe('POST /api/referrals/:id/cancellation', () => {
  it(
    'when a nurse cancels the planned operation for anaemia, then it is kept with who, when and why, audited, and stands until ' +
      'rebooked',
    async () => {
      const res = await cancel(c, { version: 1, reason: 'anaemia', note: 'Hb 96 g/L on the day before; iron first' })
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      expect(res.body.version).toBe(2)
      expect(res.body.surgeryCancelled).toMatchObject({
        kind: 'cancelled',
        fromDate: planned,
        toDate: null,
        reason: 'anaemia',
        reasonLabel: 'Cancelled for anaemia',
        note: 'Hb 96 g/L on the day before; iron first',
        changedBy: { id: nurse.id },
      })
      expect(await AuditEntry.count({ where: { action: 'cancel', entity: 'planned-operation' } })).toBe(1)

      // A second cancellation is refused: nothing more is written.
      const again = await cancel(c, { version: 2, reason: 'theatre-capacity' })
      expect(again.status).toBe(422)
      expect(Object.keys(again.body.error.fields)).toEqual(['reason'])
      expect(await SurgeryDateChange.count()).toBe(1)

      // A new date (with its reason) rebooks it; the history keeps both rows in order.
      const rebooked = await c.patch(`/api/referrals/${referralId}`, {
        version: 2,
        plannedSurgeryDate: addDays(todayIso(), 60),
        dateChangeReason: 'anaemia',
      })
      expect(rebooked.status, JSON.stringify(rebooked.body)).toBe(200)
      expect(rebooked.body.surgeryCancelled).toBeNull()
      expect(rebooked.body.dateChanges.map((d: { kind: string; reason: string }) => [d.kind, d.reason])).toEqual([
        ['cancelled', 'anaemia'],
        ['moved', 'anaemia'],
      ])
    },
  )

  it.each([
    [{ version: 1, reason: 'weather' }, 'reason'],
    [{ version: 1 }, 'reason'],
    [{ reason: 'anaemia' }, 'version'],
    [{ version: 'one', reason: 'anaemia' }, 'version'],
    [{ version: 1, reason: 'anaemia', note: 'x'.repeat(1001) }, 'note'],
  ])('when the body is %j, then 400 naming %s and nothing changes', async (body, field) => {
    const res = await cancel(c, body)
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.error.fields)).toEqual([field])
    await nothingChanged()
  })

  it('when the version is stale, then 409 and nothing changes', async () => {
    const res = await cancel(c, { version: 3, reason: 'anaemia' })
    expect(res.status).toBe(409)
    await nothingChanged()
  })

  it('when the episode is already operated, then 422 and nothing changes', async () => {
    await Referral.update({ stage: 'operated' }, { where: { id: referralId } })
    const res = await cancel(c, { version: 1, reason: 'patient-choice' })
    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('no_planned_operation')
    await nothingChanged()
  })

  it('when the operating surgeon cancels, then 200; another surgeon gets 403 and an admin 403', async () => {
    const other = await makeStaff('surgeon')
    expect((await cancel(await new Client(t.app).mustSignIn(other.email, other.password), { version: 1, reason: 'anaemia' })).status).toBe(
      403,
    )
    const admin = await makeStaff('admin')
    expect((await cancel(await new Client(t.app).mustSignIn(admin.email, admin.password), { version: 1, reason: 'anaemia' })).status).toBe(
      403,
    )
    await nothingChanged()
    const own = await cancel(await new Client(t.app).mustSignIn(surgeon.email, surgeon.password), { version: 1, reason: 'other-clinical' })
    expect(own.status).toBe(200)
    expect(own.body.surgeryCancelled).toMatchObject({ reason: 'other-clinical', reasonLabel: 'Another clinical reason' })
  })

  it('when the referral does not exist, then 404', async () => {
    expect((await c.post('/api/referrals/999999/cancellation', { version: 1, reason: 'anaemia' })).status).toBe(404)
  })
})
