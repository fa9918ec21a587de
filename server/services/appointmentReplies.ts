import { Op, type Sequelize, type Transaction } from 'sequelize'
import type { Config } from '../config'
import { Appointment, AppointmentEvent, AppointmentReplyToken, AppointmentTask, OutboxMessage, Patient } from '../models/index'
import { KIND_INFO, localTime, longDate, zoneName, type AppointmentReply } from '../../shared/appointments'
import { AppError } from '../errors'
import type { Actor } from './audit'
import { recordAudit } from './audit'
import { hashReplyToken, looksLikeReplyToken } from './appointmentTokens'
import { assertNotThrottled, countBadToken } from './appointmentReplyThrottle'

/** Refusals a patient reads: each says what happened and what to do next, in plain words. */
function refusal(config: Config, code: string, status: number, what: string, next: string): AppError {
  return new AppError(code, `${what} ${next}, please call the ${config.clinic.service} on ${config.clinic.phone}.`, status)
}

interface Found {
  token: AppointmentReplyToken
  appointment: Appointment
}

/** Finds the link's appointment, or refuses: unknown links count towards the address's limit. */
async function resolve(config: Config, raw: string, actor: Actor, t?: Transaction): Promise<Found> {
  await assertNotThrottled(config, actor.ip ?? 'unknown')
  const token = looksLikeReplyToken(raw)
    ? await AppointmentReplyToken.findOne({
        where: { tokenHash: hashReplyToken(raw) },
        transaction: t,
        lock: t ? t.LOCK.UPDATE : undefined,
      })
    : null
  if (!token) {
    await countBadToken(config, actor.ip ?? 'unknown')
    throw refusal(
      config,
      'reply_link_unknown',
      404,
      'We do not recognise this link. Check that you opened the whole link from your e-mail.',
      'If it still does not work',
    )
  }
  const appointment = await Appointment.findByPk(token.appointmentId, { transaction: t, lock: t ? t.LOCK.UPDATE : undefined })
  if (!appointment)
    throw refusal(config, 'reply_link_unknown', 404, 'We cannot find the appointment for this link.', 'To check your appointment')
  if (appointment.status === 'cancelled')
    throw refusal(
      config,
      'appointment_cancelled',
      410,
      'This appointment has been cancelled, so there is nothing to confirm.',
      'If you need a new appointment',
    )
  if (appointment.endsAt.getTime() <= Date.now())
    throw refusal(
      config,
      'reply_link_expired',
      410,
      'This appointment has already taken place, so the link no longer works.',
      'To arrange another visit',
    )
  // A link is a bearer credential in an inbox: it lives REPLY_LINK_DAYS from sending, and only the
  // newest one sent for an appointment works (ASVS 3.5.2).
  if (token.createdAt.getTime() + config.replies.linkDays * 86_400_000 <= Date.now()) {
    throw refusal(
      config,
      'reply_link_expired',
      410,
      `This link has expired: links work for ${config.replies.linkDays} days after we send them.`,
      'To confirm or change your appointment',
    )
  }
  const newer = await AppointmentReplyToken.count({ where: { appointmentId: appointment.id, id: { [Op.gt]: token.id } }, transaction: t })
  if (newer > 0) {
    throw refusal(
      config,
      'reply_link_superseded',
      410,
      'We have sent you a newer e-mail about this appointment. Please use the link in our most recent e-mail.',
      'If you cannot find it',
    )
  }
  // A link from before a move would confirm a time the patient no longer has.
  const message = token.outboxMessageId
    ? await OutboxMessage.findByPk(token.outboxMessageId, { attributes: ['payload'], transaction: t, raw: true })
    : null
  if (message && message.payload.sequence < appointment.sequence) {
    throw refusal(
      config,
      'reply_link_superseded',
      410,
      'This appointment has changed since that e-mail was sent. Please use the link in our most recent e-mail.',
      'If you cannot find it',
    )
  }
  return { token, appointment }
}

/** Only what the patient needs to recognise the visit: no diagnosis, no hospital number. */
async function replyView(config: Config, { token, appointment: a }: Found): Promise<AppointmentReply> {
  const tz = config.clinic.timeZone
  const patient = await Patient.findByPk(a.patientId, { attributes: ['givenName'], raw: true })
  return {
    firstName: patient?.givenName ?? '',
    kind: a.kind,
    kindLabel: KIND_INFO[a.kind].label,
    date: longDate(a.startsAt, tz),
    time: localTime(a.startsAt, tz),
    endTime: localTime(a.endsAt, tz),
    timeZone: tz,
    timeZoneLabel: zoneName(tz),
    place: a.location,
    preparation: KIND_INFO[a.kind].preparation,
    status: a.status,
    confirmed: token.confirmedAt !== null || a.status === 'confirmed',
    rebookRequested: token.rebookRequestedAt !== null,
    clinic: { name: config.clinic.name, service: config.clinic.service, phone: config.clinic.phone },
  }
}

export async function lookupReply(config: Config, raw: string, actor: Actor): Promise<AppointmentReply> {
  return replyView(config, await resolve(config, raw, actor))
}

export async function confirmByReply(sequelize: Sequelize, config: Config, raw: string, actor: Actor): Promise<AppointmentReply> {
  const found = await sequelize.transaction(async (t) => {
    const f = await resolve(config, raw, actor, t)
    if (f.token.confirmedAt)
      throw refusal(config, 'reply_already_used', 409, 'You have already confirmed with this link, thank you.', 'If something has changed')
    const now = new Date()
    await f.token.update({ confirmedAt: now }, { transaction: t })
    await f.appointment.update({ status: 'confirmed', confirmedAt: now }, { transaction: t })
    await AppointmentEvent.create(
      { appointmentId: f.appointment.id, kind: 'confirmed', startsAt: null, durationMin: null, location: null, note: null, userId: null },
      { transaction: t },
    )
    await recordAudit(t, actor, {
      action: 'patient-confirm',
      entity: 'appointment',
      entityId: f.appointment.id,
      patientId: f.appointment.patientId,
      after: { status: 'confirmed' },
    })
    return f
  })
  return replyView(config, found)
}

export async function rebookByReply(
  sequelize: Sequelize,
  config: Config,
  raw: string,
  actor: Actor,
  message: string | null,
): Promise<AppointmentReply> {
  const found = await sequelize.transaction(async (t) => {
    const f = await resolve(config, raw, actor, t)
    if (f.token.rebookRequestedAt)
      throw refusal(
        config,
        'reply_already_used',
        409,
        'You have already asked us to rebook with this link; a nurse will be in touch.',
        'If it is urgent',
      )
    const a = f.appointment
    await f.token.update({ rebookRequestedAt: new Date() }, { transaction: t })
    await a.update({ status: 'rebook-requested' }, { transaction: t })
    await AppointmentEvent.create(
      { appointmentId: a.id, kind: 'rebook-requested', startsAt: null, durationMin: null, location: null, note: message, userId: null },
      { transaction: t },
    )
    // The nurses' worklist picks this up; closing it is part of moving or cancelling the visit.
    await AppointmentTask.create(
      { kind: 'rebook-request', appointmentId: a.id, referralId: a.referralId, patientId: a.patientId, message },
      { transaction: t },
    )
    await recordAudit(t, actor, {
      action: 'patient-rebook-request',
      entity: 'appointment',
      entityId: a.id,
      patientId: a.patientId,
      after: { status: 'rebook-requested', message },
    })
    return f
  })
  return replyView(config, found)
}
