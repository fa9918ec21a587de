import type { AppointmentKind, MessageKind } from '../../shared/appointments'

/**
 * What a patient e-mail reports, frozen when the booking, move or cancellation is made, so a
 * message sent late (SMTP was down) still says what was true when it was written. The reply
 * link is not in here: its token is made at send time and only its hash is stored.
 */
export interface AppointmentSnapshot {
  appointmentId: number
  kind: AppointmentKind
  startsAt: string
  endsAt: string
  durationMin: number
  location: string
  /** iCalendar SEQUENCE of this version of the appointment. */
  sequence: number
  firstName: string
  fullName: string
  email: string
  /** For a move: where and when it was before. */
  previous?: { startsAt: string; location: string }
}

export interface ClinicContact {
  name: string
  service: string
  phone: string
  email: string
  timeZone: string
}

/** Messages that carry the patient's reply link (a cancellation has nothing to answer). */
export function carriesReplyLink(kind: MessageKind): boolean {
  return kind !== 'cancellation'
}
