import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { makeStaff } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { ackCode, ackError, controlId, hl7Ts, oru, send } from '../helpers/hl7'
import { AuditEntry, Hl7MessageRow, Patient, Referral } from '../../server/models/index'
import type { MllpListener } from '../../server/services/hl7/listener'
import { startTestListener } from '../helpers/hl7Listener'
import { reprocess } from '../../server/services/hl7/inbox'
import { referralFlags, addDays, todayIso, todayInZone } from '../../shared/pathway'

let t: TestApp
let listener: MllpListener
let port: number
let referralId: number
let patientId: number
let ids: { procedureId: number; surgeonId: number }

beforeAll(async () => {
  t = makeTestApp()
  ;({ listener, port } = await startTestListener(t.sequelize, t.config))
})
afterAll(async () => {
  await listener.stop()
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  ids = { surgeonId: (await makeStaff('surgeon')).id, procedureId: (await makeProcedure()).id }
  const p = await makePatient({ mrn: 'HL72001', sex: 'female', dateOfBirth: '1960-01-01' })
  patientId = p.id
  referralId = (await makeReferral({ patientId, ...ids }, { plannedSurgeryDate: addDays(todayIso(), 30) })).id
})

const ymd = (iso: string) => iso.replace(/-/g, '')

/** An SIU for an invented theatre booking (SCH-1 placer id, SCH-6 reason, SCH-11.4 start). */
function siu(event: 'S12' | 'S13' | 'S14' | 'S15', o: { mrn?: string; placer?: string; date?: string; reason?: string }): string {
  return [
    `MSH|^~\\&|KVTHEATRE|KVH-THR|FERROLANE|KVH|${hl7Ts(new Date())}||SIU^${event}^SIU_S12|${controlId()}|P|2.5.1`,
    `SCH|${o.placer ?? 'THR-5501'}|FIL-88||||${o.reason ? `R1^${o.reason}` : ''}|||||^^^${o.date ? `${ymd(o.date)}0830` : ''}`,
    `PID|1||${o.mrn ?? 'HL72001'}^^^KVH^MR||Testpatient^Invented||19600101|F`,
    `AIS|1||THR^Total hip replacement|${o.date ? `${ymd(o.date)}0830` : ''}`,
  ].join('\r')
}

const flags = async () => {
  const r = (await Referral.findByPk(referralId))!
  return referralFlags(
    { ...r.get(), plannedSurgeryDate: r.plannedSurgeryDate },
    todayInZone(t.config.clinic.timeZone),
    t.config.clinic.timeZone,
  )
}

describe('SIU theatre bookings', () => {
  it(
    'when a booking arrives, then the planned date is set and the placer id kept; a move keeps the history with its reason and ' +
      'raises the date-change flag',
    async () => {
      const booked = addDays(todayIso(), 40)
      const [a1] = await send(port, siu('S12', { date: booked }))
      expect(ackCode(a1!)).toBe('AA')
      expect(await Referral.findByPk(referralId, { raw: true })).toMatchObject({
        plannedSurgeryDate: booked,
        placerAppointmentId: 'THR-5501',
        dateChangeRequestedAt: null,
      })
      const moved = addDays(todayIso(), 55)
      const [a2] = await send(port, siu('S13', { date: moved, reason: 'Theatre list cancelled' }))
      expect(ackCode(a2!)).toBe('AA')
      const r = (await Referral.findByPk(referralId, { raw: true }))!
      expect(r.plannedSurgeryDate).toBe(moved)
      expect(r.surgeryDateHistory!.at(-1)).toMatchObject({ from: booked, to: moved, reason: 'Theatre list cancelled' })
      expect(await flags()).toContain('date-change-requested')
      expect(await AuditEntry.count({ where: { action: 'hl7-booking', entityId: String(referralId) } })).toBe(2)
    },
  )

  it('when the booking is cancelled, then the history says so and the flag is raised', async () => {
    await send(port, siu('S12', { date: addDays(todayIso(), 40) }))
    const [ack] = await send(port, siu('S15', { reason: 'Patient unwell' }))
    expect(ackCode(ack!)).toBe('AA')
    const r = (await Referral.findByPk(referralId, { raw: true }))!
    expect(r.surgeryDateHistory!.at(-1)).toMatchObject({ to: null, reason: 'Patient unwell' })
    expect(await flags()).toContain('date-change-requested')
  })

  it('when a move names an appointment id the episode was not booked under, then AE says so and nothing changes', async () => {
    await send(port, siu('S12', { date: addDays(todayIso(), 40) }))
    const [ack] = await send(port, siu('S13', { placer: 'THR-0000', date: addDays(todayIso(), 60) }))
    expect(ackCode(ack!)).toBe('AE')
    expect(ackError(ack!)).toMatch(/THR-0000/)
    expect((await Referral.findByPk(referralId, { raw: true }))!.plannedSurgeryDate).toBe(addDays(todayIso(), 40))
  })

  it(
    'when a booking is for a patient Ferrolane does not know, then it waits in the queue for a nurse and is processed once the ' +
      'patient is registered',
    async () => {
      const date = addDays(todayIso(), 35)
      const [ack] = await send(port, siu('S12', { mrn: 'HL72999', date }))
      expect(ackCode(ack!)).toBe('AE')
      const queued = (await Hl7MessageRow.findOne({ where: { needsAttention: true }, raw: true }))!
      expect(queued.messageType).toBe('SIU^S12')
      const p = await makePatient({ mrn: 'HL72999' })
      const r = await makeReferral({ patientId: p.id, ...ids })
      expect(await reprocess(t.sequelize, t.config, queued.id)).toMatchObject({ outcome: 'stored' })
      expect((await Referral.findByPk(r.id, { raw: true }))!.plannedSurgeryDate).toBe(date)
    },
  )
})

describe('ADT^A08 demographics', () => {
  const a08 = (o: { family?: string; given?: string; dob?: string; sex?: string }) =>
    [
      `MSH|^~\\&|KVPAS|KVH|FERROLANE|KVH|${hl7Ts(new Date())}||ADT^A08^ADT_A01|${controlId()}|P|2.4`,
      `EVN|A08|${hl7Ts(new Date())}`,
      `PID|1||HL72001^^^KVH^MR||${o.family ?? 'Testpatient'}^${o.given ?? 'Invented'}||${o.dob ?? '19600101'}|${o.sex ?? 'F'}`,
    ].join('\r')

  it('when the name changes, then the patient is updated and audited with before and after', async () => {
    const [ack] = await send(port, a08({ family: 'Renamed' }))
    expect(ackCode(ack!)).toBe('AA')
    expect(await Patient.findByPk(patientId, { raw: true })).toMatchObject({ familyName: 'Renamed', givenName: 'Invented' })
    const audit = (await AuditEntry.findOne({ where: { action: 'hl7-demographics' }, raw: true }))!
    expect(audit.before).toMatchObject({ familyName: expect.any(String) })
    expect(audit.after).toMatchObject({ familyName: 'Renamed' })
  })

  it('when the sex changes, then the screening thresholds that depend on it are run again', async () => {
    // Hb 125 g/L: below the 130 g/L pre-operative threshold for both sexes under the surgical
    // criteria, but the WHO 2024 thresholds differ (120 women, 130 men); set WHO criteria to see the sex matter.
    await Referral.update({ anaemiaCriteria: 'who' }, { where: { id: referralId } })
    await send(port, oru({ mrn: 'HL72001', obx: [{ value: '125' }] }))
    expect(await Referral.findByPk(referralId, { raw: true })).toMatchObject({ anaemic: 0 })
    const [ack] = await send(port, a08({ sex: 'M' }))
    expect(ackCode(ack!)).toBe('AA')
    expect(await Referral.findByPk(referralId, { raw: true })).toMatchObject({ anaemic: 1 })
  })

  it('when the sex is neither F nor M, or the patient is unknown, then AE says why and nothing changes', async () => {
    const [a1] = await send(port, a08({ sex: 'U' }))
    expect(ackCode(a1!)).toBe('AE')
    expect(ackError(a1!)).toMatch(/PID-8/)
    expect((await Patient.findByPk(patientId, { raw: true }))!.sex).toBe('female')
  })
})
