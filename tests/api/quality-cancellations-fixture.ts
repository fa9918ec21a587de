import { Outcome, SurgeryDateChange } from '../../server/models/index'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { factsAfterHandWrites } from '../helpers/episodeFacts'

/**
 * Cancellations and blood orders, small enough to count by hand (see reports-quality-orders).
 * GS: catalogue order group and screen; XM: crossmatch 2 units.
 *
 *   A S1 GS  operated 2025-03-10, 0 units crossmatched; date moved 02-20 → 03-10 for anaemia (a move, not a cancellation)
 *   B S1 GS  operated 2025-03-20, 2 units crossmatched; planned 2025-03-01 was cancelled for anaemia
 *   C S2 GS  operated 2025-04-05, 2 units crossmatched, red-cell antibodies recorded
 *   D S2 XM  operated 2025-04-15, 2 units crossmatched
 *   E S1 GS  operated 2024-12-20 (outside the period), 2 units crossmatched
 *   F S2 GS  not operated; planned 2025-05-02 cancelled for theatre capacity
 *   G S1 XM  not operated; planned 2025-06-10 cancelled for anaemia
 *   H S1 GS  not operated; planned 2026-01-05 cancelled for anaemia (outside the period)
 */
export interface OrdersFixture {
  s1: StaffFixture
  s2: StaffFixture
}

const noon = (d: string) => new Date(`${d}T12:00:00.000Z`)

export async function makeOrdersFixture(): Promise<OrdersFixture> {
  const s1 = await makeStaff('surgeon', { name: 'Surgeon Orders One' })
  const s2 = await makeStaff('surgeon', { name: 'Surgeon Orders Two' })
  const gs = await makeProcedure({ code: 'GS' })
  const xm = await makeProcedure({ code: 'XM' })
  await xm.update({ usualBloodOrder: 'crossmatch', usualUnits: 2 })

  const episode = async (surgeonId: number, procedureId: number, stage: 'operated' | 'cleared', antibodies = false) => {
    const p = await makePatient()
    const r = await makeReferral({ patientId: p.id, procedureId, surgeonId }, { stage })
    if (antibodies) await r.update({ redCellAntibodies: true })
    return r.id
  }
  const operated = (referralId: number, surgeryDate: string, unitsCrossmatched: number) =>
    Outcome.create({
      referralId,
      surgeryDate,
      bloodLossMl: 300,
      unitsTransfusedIntraOp: 0,
      unitsTransfusedPostOp: 0,
      unitsCrossmatched,
      lowestHbGL: 110,
      dischargeHbGL: null,
      lengthOfStayDays: 3,
      complications: ['none'],
      recordedBy: null,
    })
  const cancelled = (referralId: number, fromDate: string, reason: 'anaemia' | 'theatre-capacity') =>
    SurgeryDateChange.create({
      referralId,
      kind: 'cancelled',
      fromDate,
      toDate: null,
      reason,
      note: null,
      changedBy: null,
      changedAt: noon(fromDate),
    })

  const a = await episode(s1.id, gs.id, 'operated')
  await operated(a, '2025-03-10', 0)
  await SurgeryDateChange.create({
    referralId: a,
    kind: 'moved',
    fromDate: '2025-02-20',
    toDate: '2025-03-10',
    reason: 'anaemia',
    note: null,
    changedBy: null,
    changedAt: noon('2025-02-01'),
  })
  const b = await episode(s1.id, gs.id, 'operated')
  await cancelled(b, '2025-03-01', 'anaemia')
  await operated(b, '2025-03-20', 2)
  await operated(await episode(s2.id, gs.id, 'operated', true), '2025-04-05', 2)
  await operated(await episode(s2.id, xm.id, 'operated'), '2025-04-15', 2)
  await operated(await episode(s1.id, gs.id, 'operated'), '2024-12-20', 2)
  await cancelled(await episode(s2.id, gs.id, 'cleared'), '2025-05-02', 'theatre-capacity')
  await cancelled(await episode(s1.id, xm.id, 'cleared'), '2025-06-10', 'anaemia')
  await cancelled(await episode(s1.id, gs.id, 'cleared'), '2026-01-05', 'anaemia')
  await factsAfterHandWrites()
  return { s1, s2 }
}
