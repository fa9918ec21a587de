/**
 * The visits the anaemia service books. Identifiers are stable for the API; labels and
 * preparation notes are the words patients read in their e-mails and on the reply page.
 */
export const APPOINTMENT_KINDS = ['pre-assessment-bloods', 'anaemia-clinic', 'iron-infusion', 'recheck-bloods'] as const
export type AppointmentKind = (typeof APPOINTMENT_KINDS)[number]

export interface KindInfo {
  label: string
  /** Usual length, offered as the default on the booking form. */
  defaultDurationMin: number
  /** Iron infusions take a chair in one of the infusion unit's sessions. */
  needsInfusionChair: boolean
  /** What to do beforehand, in plain words; each line is one step. */
  preparation: string[]
}

export const KIND_INFO: Record<AppointmentKind, KindInfo> = {
  'pre-assessment-bloods': {
    label: 'Blood test before your operation',
    defaultDurationMin: 15,
    needsInfusionChair: false,
    preparation: [
      'You can eat and drink as usual; you do not need to fast.',
      'Wear a top with sleeves that roll up easily.',
      'Bring a list of the medicines you take, including anything you buy yourself.',
    ],
  },
  'anaemia-clinic': {
    label: 'Anaemia clinic appointment',
    defaultDurationMin: 30,
    needsInfusionChair: false,
    preparation: [
      'Bring a list of your medicines, and any iron tablets you have been taking.',
      'Think about how you have been feeling lately: tiredness, breathlessness, dizziness.',
      'You are welcome to bring someone with you.',
    ],
  },
  'iron-infusion': {
    label: 'Iron infusion (a drip into a vein)',
    defaultDurationMin: 60,
    needsInfusionChair: true,
    preparation: [
      'Eat and drink as usual beforehand.',
      'Stop any iron tablets two days before, unless your doctor told you otherwise.',
      'Plan to stay for about 30 minutes after the drip so we can check you are well.',
      'Tell the nurse if you have ever reacted to an iron injection or drip.',
    ],
  },
  'recheck-bloods': {
    label: 'Follow-up blood test',
    defaultDurationMin: 15,
    needsInfusionChair: false,
    preparation: [
      'You can eat and drink as usual.',
      'This test shows how well your treatment is working; please keep it even if you feel better.',
    ],
  },
}

export function isAppointmentKind(value: unknown): value is AppointmentKind {
  return typeof value === 'string' && (APPOINTMENT_KINDS as readonly string[]).includes(value)
}

export const APPOINTMENT_STATUSES = ['booked', 'confirmed', 'rebook-requested', 'cancelled'] as const
export type AppointmentStatus = (typeof APPOINTMENT_STATUSES)[number]

export const APPOINTMENT_STATUS_LABELS: Record<AppointmentStatus, string> = {
  booked: 'Booked, awaiting reply',
  confirmed: 'Confirmed by patient',
  'rebook-requested': 'Patient asked to rebook',
  cancelled: 'Cancelled',
}

/** Outbox states staff see beside each patient message. */
export const MESSAGE_STATUSES = ['queued', 'sending', 'sent', 'failed', 'bounced'] as const
export type MessageStatus = (typeof MESSAGE_STATUSES)[number]

export const MESSAGE_KINDS = ['booking', 'update', 'cancellation', 'reminder'] as const
export type MessageKind = (typeof MESSAGE_KINDS)[number]
