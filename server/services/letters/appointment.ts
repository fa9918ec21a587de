import type { MessageContent } from '../../mail/templates/content'
import type { LetterContent } from './pdf'

// The e-mail's own lines about attachments, links and replying to the message mean nothing on paper.
const EMAIL_ONLY = /calendar file|e-mail|the link/i

/**
 * A letter to the patient about one appointment, in the same words as the appointment e-mail
 * (server/mail/templates/content.ts), so the wording is written once.
 */
export function appointmentLetter(m: MessageContent, patient: { fullName: string; mrn: string }, date: string): LetterContent {
  return {
    title: m.heading,
    date,
    recipient: [patient.fullName],
    patient: [
      { label: 'Patient', value: patient.fullName },
      { label: 'Hospital number', value: patient.mrn },
    ],
    greeting: m.greeting,
    sections: [
      { heading: 'About your appointment', lines: m.intro.filter((l) => !EMAIL_ONLY.test(l)) },
      { heading: 'When and where', rows: m.details },
      ...(m.preparation ? [{ heading: 'Before you come', lines: m.preparation.map((l) => `•  ${l}`) }] : []),
    ],
    closing: [
      `If the time does not suit you, or you have questions, call the ${m.clinic.service} on ${m.clinic.phone}.`,
      ...m.closing.filter((l) => !EMAIL_ONLY.test(l)),
    ],
    signature: ['With best wishes,', `The ${m.clinic.service}`, m.clinic.name],
    caution: null,
    clinic: m.clinic,
  }
}
