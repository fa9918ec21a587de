import type { AppointmentKind, AppointmentStatus } from './kinds'

/**
 * What the public reply page may show: enough for the patient to recognise the visit, and
 * nothing clinical or identifying (no diagnosis, no hospital number, no surname).
 */
export interface AppointmentReply {
  firstName: string
  kind: AppointmentKind
  kindLabel: string
  /** In the clinic's calendar and clocks: 'Tuesday 14 July 2026', '09:30'. */
  date: string
  time: string
  endTime: string
  timeZone: string
  timeZoneLabel: string
  place: string
  preparation: string[]
  status: AppointmentStatus
  confirmed: boolean
  rebookRequested: boolean
  clinic: { name: string; service: string; phone: string }
}
