import type { AppointmentReply } from '@shared/appointments'
import { api } from './client'

// The patient's link token is the only credential; the CSRF header comes from client.ts as usual.
const path = (token: string) => `/replies/${encodeURIComponent(token)}`

export function fetchReply(token: string): Promise<AppointmentReply> {
  return api.get<AppointmentReply>(path(token))
}

export function confirmReply(token: string): Promise<AppointmentReply> {
  return api.post<AppointmentReply>(`${path(token)}/confirm`)
}

export function requestRebook(token: string, message: string | null): Promise<AppointmentReply> {
  return api.post<AppointmentReply>(`${path(token)}/rebook`, { message })
}
