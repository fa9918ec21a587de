import {
  KIND_INFO,
  localDate,
  localTime,
  longDate,
  type AppointmentKind,
  type AppointmentStatus,
  type MessageStatus,
} from '@shared/appointments'
import { useClinicZoneStore } from '@/stores/clinicZone'

// The clinic's zone lives in its store (stores/clinicZone.ts); read there on each call, so a
// template that shows a time redraws when the zone changes.
const zone = () => useClinicZoneStore()

export function setClinicZone(timeZone: string, label: string): void {
  zone().setZone(timeZone, label)
}
export const clinicZone = (): string => zone().timeZone
export const clinicZoneLabel = (): string => zone().label

export type Tone = 'done' | 'waiting' | 'attention' | 'refused' | 'neutral'

/** Every state has a word and an icon besides its colour (WCAG 2.2 AA: never colour alone). */
export interface StateLook {
  word: string
  icon: string
  tone: Tone
}

export const APPOINTMENT_STATE: Record<AppointmentStatus, StateLook> = {
  booked: { word: 'Booked', icon: 'pi pi-clock', tone: 'waiting' },
  confirmed: { word: 'Confirmed', icon: 'pi pi-check-circle', tone: 'done' },
  'rebook-requested': { word: 'Asked to rebook', icon: 'pi pi-exclamation-triangle', tone: 'attention' },
  cancelled: { word: 'Cancelled', icon: 'pi pi-ban', tone: 'neutral' },
}

export const MESSAGE_STATE: Record<MessageStatus, StateLook> = {
  queued: { word: 'Waiting to send', icon: 'pi pi-hourglass', tone: 'waiting' },
  sending: { word: 'Sending', icon: 'pi pi-send', tone: 'waiting' },
  sent: { word: 'Sent', icon: 'pi pi-check', tone: 'done' },
  failed: { word: 'Not sent yet, retrying', icon: 'pi pi-exclamation-triangle', tone: 'attention' },
  bounced: { word: 'Bounced', icon: 'pi pi-times-circle', tone: 'refused' },
}

export const MESSAGE_KIND_WORDS: Record<string, string> = {
  booking: 'Booking',
  update: 'Change of time or place',
  cancellation: 'Cancellation',
  reminder: 'Reminder',
}

export const EVENT_WORDS: Record<string, string> = {
  booked: 'Booked',
  moved: 'Moved',
  cancelled: 'Cancelled',
  confirmed: 'Confirmed by the patient',
  'rebook-requested': 'Patient asked to rebook',
}

/** Staff-facing names: the patient-facing KIND_INFO labels are too long for a table cell. */
export const KIND_SHORT: Record<AppointmentKind, string> = {
  'pre-assessment-bloods': 'Pre-op bloods',
  'anaemia-clinic': 'Anaemia clinic',
  'iron-infusion': 'Iron infusion',
  'recheck-bloods': 'Re-check bloods',
}

/** Where each kind usually happens; infusions take the chosen session's place instead. */
export const USUAL_PLACE: Record<AppointmentKind, string> = {
  'pre-assessment-bloods': 'Pre-operative Assessment Unit, Level 1',
  'anaemia-clinic': 'Anaemia Clinic, Outpatients B',
  'iron-infusion': 'Day Treatment Unit, Level 2',
  'recheck-bloods': 'Phlebotomy, Level 0',
}

export const kindOptions = (Object.keys(KIND_SHORT) as AppointmentKind[]).map((k) => ({
  value: k,
  label: KIND_SHORT[k],
  hint: KIND_INFO[k].label,
}))

export const clinicDate = (iso: string) => localDate(new Date(iso), zone().timeZone)
export const clinicTime = (iso: string) => localTime(new Date(iso), zone().timeZone)
export const clinicLongDate = (iso: string) => longDate(new Date(iso), zone().timeZone)

/** 'Tue 14 Jul 2026' in the clinic's calendar, for compact cells. */
export function clinicShortDate(iso: string): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone: zone().timeZone, weekday: 'short', day: 'numeric', month: 'short', year: 'numeric' })
    .format(new Date(iso))
    .replace(',', '')
}

/** '09:30–10:30 UK time'. */
export const clinicSpan = (startsAt: string, endsAt: string) => `${clinicTime(startsAt)}–${clinicTime(endsAt)} ${zone().label}`

/** The shared schema names API fields ("startsAt must be…"); staff read the form's words. */
export function formWords(message: string | undefined): string {
  if (!message) return ''
  const m = message
    .replace(/^startsAt/, 'The date and time')
    .replace(/^durationMin/, 'The length')
    .replace(/^location/, 'The place')
    .replace(/^reason/, 'The reason')
  return m.charAt(0).toUpperCase() + m.slice(1)
}

/** The server's fragment for the time field ("overlaps another appointment…") as a sentence. */
export function whenMessage(fragment: string): string {
  return /^(is|overlaps)\b/.test(fragment) ? `This date and time ${fragment}.` : `Date and time: ${fragment}.`
}
