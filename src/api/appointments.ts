import type { AppointmentView, BookingResult, CompletedTask, InfusionSessionView, OutboxRow, PatientTask } from '@shared/appointments/views'
import type { Rows } from '@shared/types'
import type { CancelAppointmentInput, CreateAppointmentInput, MoveAppointmentInput } from '@shared/schemas/appointments'
import { api } from './client'

export const listAppointments = (referralId: number) => api.get<Rows<AppointmentView>>(`/referrals/${referralId}/appointments`)
export const bookAppointment = (input: CreateAppointmentInput) => api.post<BookingResult>('/appointments', input)
export const moveAppointment = (id: number, input: MoveAppointmentInput) => api.patch<BookingResult>(`/appointments/${id}`, input)
export const cancelAppointment = (id: number, input: CancelAppointmentInput) => api.post<BookingResult>(`/appointments/${id}/cancel`, input)
export const listInfusionSessions = (from: string, to: string) =>
  api.get<Rows<InfusionSessionView>>(`/infusion-sessions?${new URLSearchParams({ from, to })}`)
export const listOutbox = (referralId: number) => api.get<Rows<OutboxRow>>(`/outbox?referralId=${referralId}`)
export const listTasks = () => api.get<Rows<PatientTask>>('/tasks?status=open')
export const completeTask = (id: number) => api.post<CompletedTask>(`/tasks/${id}/done`)
