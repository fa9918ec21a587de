import type { Hl7Message } from '@medplum/core'
import { Op, type Transaction } from 'sequelize'
import { readHl7Date, type Hl7Change } from '../../../shared/hl7'
import type { Config } from '../../config'
import { Patient, Referral } from '../../models/index'
import { recordAudit, type Actor } from '../audit'
import { Hl7Problem } from './ack'
import { mrnFromPid } from './oruRead'
import { worklistChanged } from '../worklistCounts'

// Stages after which an episode takes no booking (as for results: closed and withdrawn ones).
const ENDED = ['closed', 'withdrawn']

/** The operation's date: SCH-11 (TQ start, component 4), else the first AIS-4 start. */
function bookedDate(msg: Hl7Message): string | null {
  const sch = msg.getSegment('SCH')!
  const text = sch.getComponent(11, 4) || msg.getSegment('AIS')?.getComponent(4, 1) || ''
  return text ? readHl7Date(text) : null
}

/**
 * SIU^S12 (new booking), S13 (rescheduled), S14 (modified) and S15 (cancelled) for the
 * patient's open episode. A new booking records the theatre system's placer appointment id on
 * the episode; later messages must name that id. A move keeps the date history with the reason
 * from SCH-6; a move or a cancellation raises the same worklist flag as a surgeon's own
 * date-change request, for the clinic to look at the plan again.
 */
export async function storeSiu(
  config: Config,
  msg: Hl7Message,
  event: string,
  ctx: { messageId: number; controlId: string; actor: Actor },
  t: Transaction,
): Promise<Hl7Change[]> {
  const sch = msg.getSegment('SCH')
  const pid = msg.getSegment('PID')
  if (!sch) throw new Hl7Problem('AR', 'missing-sch', 'the booking has no SCH segment', '100', { segment: 'SCH' })
  if (!pid) throw new Hl7Problem('AR', 'missing-pid', 'the booking has no PID segment', '100', { segment: 'PID' })
  const placer = (sch.getComponent(1, 1) || sch.getComponent(2, 1)).trim().slice(0, 80)
  if (!placer)
    throw new Hl7Problem('AR', 'missing-placer-id', 'SCH-1 (or SCH-2) appointment id is empty', '101', { segment: 'SCH', field: 1 })
  const mrn = mrnFromPid(pid, config.hl7.assigningAuthority)
  const patient = await Patient.findOne({ where: { mrn }, transaction: t })
  if (!patient)
    throw new Hl7Problem(
      'AE',
      'unknown-mrn',
      `no patient has MRN ${mrn}: a nurse registers the patient, then processes the booking again`,
      '204',
      { segment: 'PID', field: 3 },
    )
  const open = { patientId: patient.id, stage: { [Op.notIn]: ENDED } }
  const referral =
    event === 'S12'
      ? ((await Referral.findOne({ where: { ...open, placerAppointmentId: placer }, transaction: t, lock: t.LOCK.UPDATE })) ??
        (await Referral.findOne({
          where: { ...open, placerAppointmentId: null },
          order: [['id', 'DESC']],
          transaction: t,
          lock: t.LOCK.UPDATE,
        })))
      : await Referral.findOne({ where: { ...open, placerAppointmentId: placer }, transaction: t, lock: t.LOCK.UPDATE })
  if (!referral) {
    const why =
      event === 'S12'
        ? `patient ${mrn} has no open episode to book`
        : `patient ${mrn} has no open episode booked under appointment ${placer}`
    throw new Hl7Problem('AE', 'no-open-referral', why, '204', { segment: 'SCH', field: 1 })
  }
  const reason = (sch.getComponent(6, 2) || sch.getComponent(6, 1)).trim().slice(0, 200) || null
  const from = referral.plannedSurgeryDate
  const history = [...(referral.surgeryDateHistory ?? [])]
  const entry = { at: new Date().toISOString(), reason, source: `HL7 ${event} ${ctx.controlId}` }
  const changes: Hl7Change[] = []
  if (event === 'S15') {
    history.push({ ...entry, from, to: null })
    // The date column cannot be empty: the last booked date stays, flagged, until a new booking.
    worklistChanged('referral', t)
    await referral.update(
      { surgeryDateHistory: history, dateChangeRequestedAt: new Date(), version: referral.version + 1 },
      { transaction: t },
    )
    changes.push({ kind: 'surgery-cancelled', referralId: referral.id, detail: `${from} cancelled${reason ? `: ${reason}` : ''}` })
  } else {
    const to = bookedDate(msg)
    if (!to)
      throw new Hl7Problem('AE', 'bad-date', 'the booking has no readable start date (SCH-11 start or AIS-4)', '102', {
        segment: 'SCH',
        field: 11,
      })
    if (to === from && referral.placerAppointmentId === placer) return []
    const moved = to !== from
    if (moved) history.push({ ...entry, from, to })
    worklistChanged('referral', t)
    await referral.update(
      {
        plannedSurgeryDate: to,
        placerAppointmentId: placer,
        surgeryDateHistory: history,
        version: referral.version + 1,
        ...(moved && event !== 'S12' ? { dateChangeRequestedAt: new Date() } : {}),
      },
      { transaction: t },
    )
    changes.push({
      kind: moved ? 'surgery-moved' : 'surgery-booked',
      referralId: referral.id,
      detail: moved ? `${from} → ${to}${reason ? `: ${reason}` : ''}` : `booked as ${placer}`,
    })
  }
  await recordAudit(t, ctx.actor, {
    action: 'hl7-booking',
    entity: 'referral',
    entityId: referral.id,
    patientId: patient.id,
    before: { plannedSurgeryDate: from },
    after: { hl7MessageId: ctx.messageId, event, placerAppointmentId: placer, plannedSurgeryDate: referral.plannedSurgeryDate, reason },
  })
  return changes
}
