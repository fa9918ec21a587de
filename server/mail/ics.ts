import { createEvent } from 'ics'
import { KIND_INFO, type MessageKind } from '../../shared/appointments'
import type { AppointmentSnapshot, ClinicContact } from './snapshot'

/** One UID per appointment for its whole life, so calendars update or remove the same entry. */
export function appointmentUid(appointmentId: number): string {
  return `appointment-${appointmentId}@ferrolane`
}

export interface CalendarFile {
  method: 'REQUEST' | 'CANCEL'
  content: string
}

/**
 * An RFC 5545 invitation (RFC 5546 iTIP): REQUEST for a booking, move or reminder, CANCEL with
 * STATUS:CANCELLED for a cancellation. Times are written in UTC ("Z"), which every calendar
 * shows in its owner's zone; the e-mail text states the clinic's zone.
 */
export function calendarFile(kind: MessageKind, s: AppointmentSnapshot, clinic: ClinicContact, replyUrl: string | null): CalendarFile {
  const method = kind === 'cancellation' ? 'CANCEL' : 'REQUEST'
  const info = KIND_INFO[s.kind]
  const lines = [
    `${info.label} with the ${clinic.service}, ${clinic.name}.`,
    '',
    'Before you come:',
    ...info.preparation.map((p) => `- ${p}`),
  ]
  if (replyUrl) lines.push('', `Confirm or ask to rebook: ${replyUrl}`)
  lines.push('', `Questions: call ${clinic.phone}.`)
  const { error, value } = createEvent({
    productId: 'ferrolane/appointments',
    method,
    uid: appointmentUid(s.appointmentId),
    sequence: s.sequence,
    start: Date.parse(s.startsAt),
    startInputType: 'utc',
    startOutputType: 'utc',
    end: Date.parse(s.endsAt),
    endInputType: 'utc',
    endOutputType: 'utc',
    // Neutral like the subject: calendars show the title on shared screens; the detail is in the description.
    title: `Hospital appointment — ${clinic.name}`,
    description: lines.join('\n'),
    location: s.location,
    status: method === 'CANCEL' ? 'CANCELLED' : 'CONFIRMED',
    // iTIP needs an organiser for REQUEST and CANCEL; the patient is the one attendee.
    organizer: { name: clinic.name, email: clinic.email },
    attendees: [{ name: s.fullName, email: s.email, rsvp: false, role: 'REQ-PARTICIPANT', partstat: 'NEEDS-ACTION' }],
    ...url(replyUrl),
  })
  if (error || !value) throw new Error(`Could not build the calendar file: ${error?.message ?? 'no output'}`)
  return { method, content: value }
}

function url(replyUrl: string | null): { url?: string } {
  return replyUrl ? { url: replyUrl } : {}
}
