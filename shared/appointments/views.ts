import type { AppointmentKind, AppointmentStatus, MessageKind, MessageStatus } from './kinds'

/*
 * The appointments API's answers (server/services/appointmentView.ts, infusionSessions.ts,
 * outbox.ts, appointmentTasks.ts, appointmentRules.ts). The server's mappers declare these as
 * their return types and the client imports them.
 */

export type AppointmentEventKind = 'booked' | 'moved' | 'cancelled' | 'confirmed' | 'rebook-requested'

/** One step of an appointment's history; `byPatient` when the patient's reply link made it. */
export interface AppointmentEventView {
  id: number
  kind: AppointmentEventKind
  startsAt: string | null
  durationMin: number | null
  location: string | null
  note: string | null
  userId: number | null
  byPatient: boolean
  at: string
}

/** How one patient e-mail about an appointment went. */
export interface MessageStatusView {
  id: number
  kind: MessageKind
  status: MessageStatus
  attempts: number
  sentAt: string | null
  lastError: string | null
}

/** The appointment as the API returns it; events and messages when the caller loaded them. */
export interface AppointmentView {
  id: number
  referralId: number
  patientId: number
  kind: AppointmentKind
  kindLabel: string
  startsAt: string
  endsAt: string
  durationMin: number
  location: string
  infusionSessionId: number | null
  status: AppointmentStatus
  statusLabel: string
  sequence: number
  version: number
  cancelReason: string | null
  confirmedAt: string | null
  createdAt: string
  updatedAt: string
  events?: AppointmentEventView[]
  messages?: MessageStatusView[]
}

/** The e-mail queued by a booking, a move or a cancellation (null when the patient has no address). */
export interface QueuedMessage {
  id: number
  status: MessageStatus
}

/** POST /api/appointments, PATCH /api/appointments/:id and POST /api/appointments/:id/cancel. */
export interface BookingResult {
  appointment: AppointmentView
  message: QueuedMessage | null
}

/** One infusion session, in the clinic's wall-clock time, with how many chairs are taken. */
export interface InfusionSessionView {
  id: number
  date: string
  startTime: string
  endTime: string
  timeZone: string
  startsAt: string
  endsAt: string
  chairs: number
  location: string
  bookings: number
  peakChairsInUse: number
  full: boolean
  version: number
}

/** One free slot the server offers with a full-session refusal (README: error.details.suggestions). */
export interface SlotSuggestion {
  sessionId: number
  startsAt: string
  endsAt: string
  date: string
  time: string
  location: string
}

/** One patient message in the outbox (GET /api/outbox). */
export interface OutboxRow {
  id: number
  kind: MessageKind
  status: MessageStatus
  appointmentId: number | null
  referralId: number | null
  patient: { id: number; name: string; mrn: string } | null
  toAddress: string
  subject: string
  attempts: number
  lastError: string | null
  nextAttemptAt: string | null
  sentAt: string | null
  createdAt: string
}

/** A patient's request waiting for a nurse (GET /api/tasks). */
export interface PatientTask {
  id: number
  kind: 'rebook-request'
  status: 'open' | 'done'
  message: string | null
  createdAt: string
  doneAt: string | null
  referralId: number
  patient: { id: number; name: string; mrn: string; phone: string | null }
  appointment: { id: number; kind: AppointmentKind; kindLabel: string; startsAt: string; location: string; status: AppointmentStatus }
}

/** POST /api/tasks/:id/done */
export interface CompletedTask {
  id: number
  status: 'done'
}
