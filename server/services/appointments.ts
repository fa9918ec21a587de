import type { AppointmentView, BookingResult } from '../../shared/appointments/views'
import type { Rows } from '../../shared/types'
import type { InferAttributes } from 'sequelize'
import type { Sequelize, Transaction } from 'sequelize'
import type { Config } from '../config'
import { Appointment, AppointmentEvent, AppointmentTask, Patient, Referral } from '../models/index'
import { KIND_INFO, type AppointmentKind } from '../../shared/appointments'
import { isReadOnly } from '../../shared/pathway'
import type { CancelAppointmentInput, CreateAppointmentInput, MoveAppointmentInput } from '../../shared/schemas/appointments'
import { Conflict, Invalid, NotFound, RuleRefused } from '../errors'
import { recordAudit, changedFields } from './audit'
import { assertMaySeeReferral, staleVersion, type Viewer } from './viewer'
import { appointmentView, snapshotOf } from './appointmentView'
import { assertNoDoubleBooking, takeInfusionChair } from './appointmentRules'
import { reminderDueAt } from './appointmentReminders'
import { enqueueMessage, messagesFor } from './outbox'
import { unitOfWork } from '../unitOfWork'

const auditable = (a: Appointment) => ({
  kind: a.kind,
  startsAt: a.startsAt.toISOString(),
  durationMin: a.durationMin,
  location: a.location,
  infusionSessionId: a.infusionSessionId,
  status: a.status,
  sequence: a.sequence,
  version: a.version,
})

const spanOf = (startsAt: Date, durationMin: number) => ({ startMs: startsAt.getTime(), endMs: startsAt.getTime() + durationMin * 60_000 })

/** A patient's reply tasks end when staff act on the appointment. */
async function closeOpenTasks(t: Transaction, appointmentId: number, userId: number): Promise<void> {
  await AppointmentTask.update(
    { status: 'done', doneAt: new Date(), doneBy: userId },
    { where: { appointmentId, status: 'open' }, transaction: t },
  )
}

async function lockedPatient(t: Transaction, patientId: number): Promise<Patient> {
  // The patient row is the lock that serialises every booking for that patient.
  const p = await Patient.findByPk(patientId, { transaction: t, lock: t.LOCK.UPDATE })
  if (!p) throw new NotFound('Patient')
  return p
}

export async function bookAppointment(
  sequelize: Sequelize,
  config: Config,
  viewer: Viewer,
  input: CreateAppointmentInput,
): Promise<BookingResult> {
  const referral = await Referral.findByPk(input.referralId, { raw: true })
  if (!referral) throw new Invalid('referralId does not match an episode', { referralId: 'must be an existing referral' })
  assertMaySeeReferral(viewer, referral.surgeonId)
  if (isReadOnly(referral.stage)) throw new RuleRefused('This episode is closed; appointments cannot be booked on it', 'closed_read_only')
  const kind = input.kind as AppointmentKind
  const startsAt = new Date(input.startsAt)
  const span = spanOf(startsAt, input.durationMin)
  return unitOfWork(sequelize, { idempotent: true }, async (t) => {
    const patient = await lockedPatient(t, referral.patientId)
    await assertNoDoubleBooking(t, patient.id, span, config.clinic.timeZone)
    const sessionId = KIND_INFO[kind].needsInfusionChair
      ? await takeInfusionChair(t, patient.id, span, input.durationMin, config.clinic.timeZone)
      : null
    const a = await Appointment.create(
      {
        referralId: referral.id,
        patientId: patient.id,
        kind,
        startsAt,
        endsAt: new Date(span.endMs),
        durationMin: input.durationMin,
        location: input.location,
        infusionSessionId: sessionId,
        remindAt: reminderDueAt(config, startsAt, new Date()),
        createdBy: viewer.userId,
      },
      { transaction: t },
    )
    await AppointmentEvent.create(
      {
        appointmentId: a.id,
        kind: 'booked',
        startsAt,
        durationMin: a.durationMin,
        location: a.location,
        note: null,
        userId: viewer.userId,
      },
      { transaction: t },
    )
    const message = await enqueueMessage(t, config, {
      kind: 'booking',
      snapshot: snapshotOf(a.get({ plain: true }), patient),
      referralId: referral.id,
      patientId: patient.id,
    })
    await recordAudit(t, viewer, { action: 'create', entity: 'appointment', entityId: a.id, patientId: patient.id, after: auditable(a) })
    return { appointment: appointmentView(a.get({ plain: true })), message }
  })
}

async function lockedAppointment(t: Transaction, viewer: Viewer, id: number): Promise<Appointment> {
  const a = await Appointment.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE })
  if (!a) throw new NotFound('Appointment')
  const referral = await Referral.findByPk(a.referralId, { transaction: t, raw: true })
  assertMaySeeReferral(viewer, referral!.surgeonId)
  return a
}

export async function moveAppointment(
  sequelize: Sequelize,
  config: Config,
  viewer: Viewer,
  id: number,
  input: MoveAppointmentInput,
): Promise<BookingResult> {
  return unitOfWork(sequelize, { idempotent: true }, async (t) => {
    const a = await lockedAppointment(t, viewer, id)
    if (a.version !== input.version) throw staleVersion('This appointment')
    if (a.status === 'cancelled') throw new RuleRefused('This appointment is cancelled; book a new one instead', 'appointment_cancelled')
    const startsAt = input.startsAt ? new Date(input.startsAt) : a.startsAt
    const durationMin = input.durationMin ?? a.durationMin
    const location = input.location ?? a.location
    if (startsAt.getTime() === a.startsAt.getTime() && durationMin === a.durationMin && location === a.location) {
      throw new Invalid('The appointment already has this time, length and place', { startsAt: 'is unchanged' })
    }
    const span = spanOf(startsAt, durationMin)
    const patient = await lockedPatient(t, a.patientId)
    await assertNoDoubleBooking(t, patient.id, span, config.clinic.timeZone, a.id)
    const sessionId = KIND_INFO[a.kind].needsInfusionChair
      ? await takeInfusionChair(t, patient.id, span, durationMin, config.clinic.timeZone, a.id)
      : null
    const before = auditable(a)
    const previous = { startsAt: a.startsAt, location: a.location }
    // A new time needs a new answer from the patient, so the status starts again at 'booked'.
    await a.update(
      {
        startsAt,
        endsAt: new Date(span.endMs),
        durationMin,
        location,
        infusionSessionId: sessionId,
        status: 'booked',
        confirmedAt: null,
        sequence: a.sequence + 1,
        version: a.version + 1,
        remindAt: reminderDueAt(config, startsAt, new Date()),
      },
      { transaction: t },
    )
    await AppointmentEvent.create(
      { appointmentId: a.id, kind: 'moved', startsAt, durationMin, location, note: null, userId: viewer.userId },
      { transaction: t },
    )
    await closeOpenTasks(t, a.id, viewer.userId)
    const message = await enqueueMessage(t, config, {
      kind: 'update',
      snapshot: snapshotOf(a.get({ plain: true }), patient, previous),
      referralId: a.referralId,
      patientId: a.patientId,
    })
    await recordAudit(t, viewer, {
      action: 'move',
      entity: 'appointment',
      entityId: a.id,
      patientId: a.patientId,
      ...changedFields(before, auditable(a)),
    })
    return { appointment: appointmentView(a.get({ plain: true })), message }
  })
}

export async function cancelAppointment(
  sequelize: Sequelize,
  config: Config,
  viewer: Viewer,
  id: number,
  input: CancelAppointmentInput,
): Promise<BookingResult> {
  return unitOfWork(sequelize, { idempotent: true }, async (t) => {
    const a = await lockedAppointment(t, viewer, id)
    if (a.status === 'cancelled') throw new Conflict('This appointment is already cancelled', 'already_cancelled')
    const before = auditable(a)
    // The cancellation is a new version of the calendar entry (RFC 5545 SEQUENCE).
    await a.update(
      { status: 'cancelled', cancelReason: input.reason, sequence: a.sequence + 1, version: a.version + 1, remindAt: null },
      { transaction: t },
    )
    await AppointmentEvent.create(
      {
        appointmentId: a.id,
        kind: 'cancelled',
        startsAt: null,
        durationMin: null,
        location: null,
        note: input.reason,
        userId: viewer.userId,
      },
      { transaction: t },
    )
    await closeOpenTasks(t, a.id, viewer.userId)
    const patient = await Patient.findByPk(a.patientId, { transaction: t, raw: true })
    const message = await enqueueMessage(t, config, {
      kind: 'cancellation',
      snapshot: snapshotOf(a.get({ plain: true }), patient!),
      referralId: a.referralId,
      patientId: a.patientId,
    })
    const diff = changedFields(before, auditable(a))
    await recordAudit(t, viewer, {
      action: 'cancel',
      entity: 'appointment',
      entityId: a.id,
      patientId: a.patientId,
      before: diff.before,
      after: { ...diff.after, reason: input.reason },
    })
    return { appointment: appointmentView(a.get({ plain: true })), message }
  })
}

async function withHistory(rows: InferAttributes<Appointment>[]): Promise<AppointmentView[]> {
  const ids = rows.map((r) => r.id)
  const [events, messages] = await Promise.all([
    ids.length
      ? AppointmentEvent.findAll({
          where: { appointmentId: ids },
          order: [
            ['at', 'ASC'],
            ['id', 'ASC'],
          ],
          raw: true,
        })
      : [],
    messagesFor(ids),
  ])
  return rows.map((r) =>
    appointmentView(r, {
      events: events.filter((e) => e.appointmentId === r.id),
      messages: messages.filter((m) => m.appointmentId === r.id),
    }),
  )
}

export async function listReferralAppointments(viewer: Viewer, referralId: number): Promise<Rows<AppointmentView>> {
  const referral = await Referral.findByPk(referralId, { raw: true })
  if (!referral) throw new NotFound('Referral')
  assertMaySeeReferral(viewer, referral.surgeonId)
  const rows = await Appointment.findAll({
    where: { referralId },
    order: [
      ['startsAt', 'ASC'],
      ['id', 'ASC'],
    ],
    raw: true,
  })
  await recordAudit(null, viewer, { action: 'view', entity: 'appointments', entityId: referralId, patientId: referral.patientId })
  return { rows: await withHistory(rows) }
}

export async function getAppointment(viewer: Viewer, id: number): Promise<AppointmentView> {
  const a = await Appointment.findByPk(id, { raw: true })
  if (!a) throw new NotFound('Appointment')
  const referral = await Referral.findByPk(a.referralId, { raw: true })
  assertMaySeeReferral(viewer, referral!.surgeonId)
  await recordAudit(null, viewer, { action: 'view', entity: 'appointment', entityId: id, patientId: referral!.patientId })
  return (await withHistory([a]))[0]!
}
