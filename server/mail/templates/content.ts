import { KIND_INFO, localTime, longDate, shortDate, zoneName, type MessageKind } from '../../../shared/appointments'
import type { AppointmentSnapshot, ClinicContact } from '../snapshot'

/** The words of one patient e-mail, before they are laid out as text or HTML. */
export interface MessageContent {
  subject: string
  heading: string
  greeting: string
  intro: string[]
  details: { label: string; value: string }[]
  preparation: string[] | null
  reply: { url: string; prompt: string } | null
  closing: string[]
  clinic: ClinicContact
}

function when(iso: string, clinic: ClinicContact): string {
  const d = new Date(iso)
  return `${longDate(d, clinic.timeZone)} at ${localTime(d, clinic.timeZone)}`
}

/**
 * Subjects say only that it is a hospital appointment, and when: an inbox preview or a lock
 * screen is read by others, and "anaemia clinic" or "iron infusion" is health information. The
 * kind of visit and the clinic are in the body.
 */
export const NEUTRAL_SUBJECT = 'Your hospital appointment'

export function subjectFor(kind: MessageKind, s: AppointmentSnapshot, clinic: ClinicContact): string {
  const d = new Date(s.startsAt)
  const at = `${shortDate(d, clinic.timeZone)}, ${localTime(d, clinic.timeZone)}`
  switch (kind) {
    case 'booking':
      return `${NEUTRAL_SUBJECT} is booked: ${at}`
    case 'update':
      return `${NEUTRAL_SUBJECT} has changed: ${at}`
    case 'cancellation':
      return `${NEUTRAL_SUBJECT} is cancelled: ${at}`
    case 'reminder':
      return `${NEUTRAL_SUBJECT} is coming up: ${at}`
  }
}

const INTRO: Record<MessageKind, (s: AppointmentSnapshot, c: ClinicContact) => { heading: string; intro: string[] }> = {
  booking: (_s, c) => ({
    heading: 'Your appointment is booked',
    intro: [`We have booked the appointment below for you with the ${c.service} at ${c.name}.`],
  }),
  update: (s, c) => ({
    heading: 'Your appointment has changed',
    intro: [
      'We have changed the time or place of your appointment. The new details are below.',
      ...(s.previous ? [`It was ${when(s.previous.startsAt, c)}, ${s.previous.location}.`] : []),
      'The calendar file attached replaces the earlier entry in your calendar.',
    ],
  }),
  cancellation: (_s, c) => ({
    heading: 'Your appointment is cancelled',
    intro: [
      'We have cancelled the appointment below, so please do not come in for it.',
      'The calendar file attached removes it from your calendar.',
      `If you did not expect this, or need a new appointment, call us on ${c.phone}.`,
    ],
  }),
  reminder: () => ({
    heading: 'Your appointment is coming up',
    intro: ['This is a reminder of your appointment with us. The details are below.'],
  }),
}

export function messageContent(kind: MessageKind, s: AppointmentSnapshot, clinic: ClinicContact, replyUrl: string | null): MessageContent {
  const { heading, intro } = INTRO[kind](s, clinic)
  const start = new Date(s.startsAt)
  const end = new Date(s.endsAt)
  const cancelled = kind === 'cancellation'
  return {
    subject: subjectFor(kind, s, clinic),
    heading,
    greeting: `Dear ${s.firstName},`,
    intro,
    details: [
      { label: 'Visit', value: KIND_INFO[s.kind].label },
      { label: 'Date', value: longDate(start, clinic.timeZone) },
      // Stated with its zone: a patient abroad or a phone set to another zone must not guess.
      { label: 'Time', value: `${localTime(start, clinic.timeZone)} to ${localTime(end, clinic.timeZone)}, ${zoneName(clinic.timeZone)}` },
      { label: 'Place', value: s.location },
    ],
    preparation: cancelled ? null : KIND_INFO[s.kind].preparation,
    reply: replyUrl
      ? {
          url: replyUrl,
          prompt: 'Please tell us whether you can come. If the time does not suit you, the same page lets you ask us for another.',
        }
      : null,
    closing: [
      `Questions, or cannot use the link? Call the ${clinic.service} on ${clinic.phone}.`,
      'Please do not reply to this e-mail: the address is not read.',
    ],
    clinic,
  }
}
