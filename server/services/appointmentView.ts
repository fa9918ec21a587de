import type { InferAttributes } from 'sequelize'
import type { Appointment, AppointmentEvent, OutboxMessage, Patient } from '../models/index'
import { KIND_INFO, APPOINTMENT_STATUS_LABELS, type AppointmentStatus } from '../../shared/appointments'
import type { AppointmentSnapshot } from '../mail/snapshot'
import type { AppointmentView, MessageStatusView } from '../../shared/appointments/views'
import { isoOrNull } from './viewer'

type AppointmentRow = InferAttributes<Appointment>

/** The appointment as the API returns it; events and messages when the caller loaded them. */
export function appointmentView(
  a: AppointmentRow,
  extra: { events?: InferAttributes<AppointmentEvent>[]; messages?: InferAttributes<OutboxMessage>[] } = {},
): AppointmentView {
  return {
    id: a.id,
    referralId: a.referralId,
    patientId: a.patientId,
    kind: a.kind,
    kindLabel: KIND_INFO[a.kind].label,
    startsAt: isoOrNull(a.startsAt)!,
    endsAt: isoOrNull(a.endsAt)!,
    durationMin: a.durationMin,
    location: a.location,
    infusionSessionId: a.infusionSessionId,
    status: a.status,
    statusLabel: APPOINTMENT_STATUS_LABELS[a.status as AppointmentStatus],
    sequence: a.sequence,
    version: a.version,
    cancelReason: a.cancelReason ?? null,
    confirmedAt: isoOrNull(a.confirmedAt),
    createdAt: isoOrNull(a.createdAt)!,
    updatedAt: isoOrNull(a.updatedAt)!,
    ...(extra.events
      ? {
          events: extra.events.map((e) => ({
            id: e.id,
            kind: e.kind,
            startsAt: isoOrNull(e.startsAt),
            durationMin: e.durationMin,
            location: e.location,
            note: e.note,
            userId: e.userId,
            byPatient: e.userId === null,
            at: isoOrNull(e.at)!,
          })),
        }
      : {}),
    ...(extra.messages ? { messages: extra.messages.map(messageStatusView) } : {}),
  }
}

export function messageStatusView(m: InferAttributes<OutboxMessage>): MessageStatusView {
  return { id: m.id, kind: m.kind, status: m.status, attempts: m.attempts, sentAt: isoOrNull(m.sentAt), lastError: m.lastError ?? null }
}

/** The frozen facts a patient e-mail reports (see mail/snapshot.ts). */
export function snapshotOf(
  a: AppointmentRow,
  p: Pick<Patient, 'givenName' | 'familyName' | 'email'>,
  previous?: { startsAt: Date; location: string },
): AppointmentSnapshot {
  return {
    appointmentId: a.id,
    kind: a.kind,
    startsAt: isoOrNull(a.startsAt)!,
    endsAt: isoOrNull(a.endsAt)!,
    durationMin: a.durationMin,
    location: a.location,
    sequence: a.sequence,
    firstName: p.givenName,
    fullName: `${p.givenName} ${p.familyName}`,
    email: p.email ?? '',
    ...(previous ? { previous: { startsAt: previous.startsAt.toISOString(), location: previous.location } } : {}),
  }
}
