// Appointments as data both sides use: kinds and their words, clinic-time helpers, chair capacity.
export {
  APPOINTMENT_KINDS,
  KIND_INFO,
  APPOINTMENT_STATUSES,
  APPOINTMENT_STATUS_LABELS,
  MESSAGE_STATUSES,
  MESSAGE_KINDS,
  isAppointmentKind,
} from './kinds'
export type { AppointmentKind, AppointmentStatus, KindInfo, MessageKind, MessageStatus } from './kinds'
export { zonedToUtc, zoneOffsetMs, localDate, localTime, longDate, shortDate, zoneName, isTimeZone } from './time'
export { peakOverlap, overlaps, freeSlots, SLOT_STEP_MIN } from './capacity'
export type { Span, SessionLoad } from './capacity'
export type { AppointmentReply } from './reply'
