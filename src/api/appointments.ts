import type { AppointmentKind, AppointmentStatus, MessageKind, MessageStatus } from '@shared/appointments'
import type { CancelAppointmentInput, CreateAppointmentInput, MoveAppointmentInput } from '@shared/schemas/appointments'
import { api } from './client'

/** Shapes as server/services/appointmentView.ts, infusionSessions.ts, outbox.ts and appointmentTasks.ts return them. */
export interface AppointmentEventView {
  id: number
  kind: 'booked' | 'moved' | 'cancelled' | 'confirmed' | 'rebook-requested'
  startsAt: string | null
  durationMin: number | null
  location: string | null
  note: string | null
  userId: number | null
  byPatient: boolean
  at: string
}

export interface MessageStatusView { id: number; kind: MessageKind; status: MessageStatus; attempts: number; sentAt: string | null; lastError: string | null }

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
  events?: AppointmentEventView[]
  messages?: MessageStatusView[]
}

export interface BookingResult { appointment: AppointmentView; message: { id: number; status: string } | null }

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
export interface SlotSuggestion { sessionId: number; startsAt: string; endsAt: string; date: string; time: string; location: string }

export interface OutboxRow {
  id: number
  kind: MessageKind
  status: MessageStatus
  appointmentId: number | null
  referralId: number
  toAddress: string
  subject: string
  attempts: number
  lastError: string | null
  nextAttemptAt: string | null
  sentAt: string | null
  createdAt: string
}

export interface PatientTask {
  id: number
  kind: string
  status: 'open' | 'done'
  message: string | null
  createdAt: string
  referralId: number
  patient: { id: number; name: string; mrn: string; phone: string | null }
  appointment: { id: number; kind: AppointmentKind; kindLabel: string; startsAt: string; location: string; status: AppointmentStatus }
}

// The three polled lists ask conditionally: `previous` is what the screen shows, kept on a 304.
export const listAppointments = (referralId: number, previous?: { rows: AppointmentView[] }) =>
  api.poll<{ rows: AppointmentView[] }>(`/referrals/${referralId}/appointments`, previous)
export const bookAppointment = (input: CreateAppointmentInput) => api.post<BookingResult>('/appointments', input)
export const moveAppointment = (id: number, input: MoveAppointmentInput) => api.patch<BookingResult>(`/appointments/${id}`, input)
export const cancelAppointment = (id: number, input: CancelAppointmentInput) => api.post<BookingResult>(`/appointments/${id}/cancel`, input)
export const listInfusionSessions = (from: string, to: string) =>
  api.get<{ rows: InfusionSessionView[] }>(`/infusion-sessions?${new URLSearchParams({ from, to })}`)
export const listOutbox = (referralId: number, previous?: { rows: OutboxRow[] }) =>
  api.poll<{ rows: OutboxRow[] }>(`/outbox?referralId=${referralId}`, previous)
export const listTasks = (previous?: { rows: PatientTask[] }) => api.poll<{ rows: PatientTask[] }>('/tasks?status=open', previous)
export const completeTask = (id: number) => api.post<{ id: number; status: 'done' }>(`/tasks/${id}/done`)
