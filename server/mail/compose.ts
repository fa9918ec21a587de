import type { Config } from '../config'
import type { MessageKind } from '../../shared/appointments'
import { calendarFile } from './ics'
import type { AppointmentSnapshot, ClinicContact } from './snapshot'
import { messageContent } from './templates/content'
import { renderText } from './templates/text'
import { renderHtml } from './templates/html'

export interface ComposedMail {
  subject: string
  text: string
  html: string
  ics: { method: 'REQUEST' | 'CANCEL'; content: string; filename: string }
}

export function clinicContact(config: Config): ClinicContact {
  return { ...config.clinic }
}

export function replyUrl(config: Config, token: string): string {
  return `${config.publicUrl}/reply/${token}`
}

/** Text, HTML and the calendar file of one patient e-mail, all from the same words. */
export function composeMail(config: Config, kind: MessageKind, s: AppointmentSnapshot, token: string | null): ComposedMail {
  const clinic = clinicContact(config)
  const link = token ? replyUrl(config, token) : null
  const content = messageContent(kind, s, clinic, link)
  const ics = calendarFile(kind, s, clinic, link)
  return {
    subject: content.subject,
    text: renderText(content),
    html: renderHtml(content),
    ics: { ...ics, filename: ics.method === 'CANCEL' ? 'cancellation.ics' : 'appointment.ics' },
  }
}
