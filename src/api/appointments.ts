import type { AppointmentView, BookingResult, CompletedTask, InfusionSessionView, OutboxRow, PatientTask } from '@shared/appointments/views'
import type { Rows } from '@shared/types'
import type { CancelAppointmentInput, CreateAppointmentInput, MoveAppointmentInput } from '@shared/schemas/appointments'
import { api } from './client'

// The three polled lists ask conditionally: `previous` is what the screen shows, kept on a 304.
export const listAppointments = (referralId: number, previous?: Rows<AppointmentView>) =>
  api.poll<Rows<AppointmentView>>(`/referrals/${referralId}/appointments`, previous)
export const bookAppointment = (input: CreateAppointmentInput) => api.post<BookingResult>('/appointments', input)
export const moveAppointment = (id: number, input: MoveAppointmentInput) => api.patch<BookingResult>(`/appointments/${id}`, input)
export const cancelAppointment = (id: number, input: CancelAppointmentInput) => api.post<BookingResult>(`/appointments/${id}/cancel`, input)
export const listInfusionSessions = (from: string, to: string) =>
  api.get<Rows<InfusionSessionView>>(`/infusion-sessions?${new URLSearchParams({ from, to })}`)
export const listOutbox = (referralId: number, previous?: Rows<OutboxRow>) =>
  api.poll<Rows<OutboxRow>>(`/outbox?referralId=${referralId}`, previous)
export const listTasks = (previous?: Rows<PatientTask>) => api.poll<Rows<PatientTask>>('/tasks?status=open', previous)
export const completeTask = (id: number) => api.post<CompletedTask>(`/tasks/${id}/done`)
