/** What became of one HL7 v2 message (API values; labels for people in HL7_OUTCOME_LABELS). */
export type Hl7Outcome = 'stored' | 'nothing-new' | 'error' | 'rejected'

export const HL7_OUTCOME_LABELS: Record<Hl7Outcome, string> = {
  stored: 'Stored',
  'nothing-new': 'Nothing new',
  error: 'Needs attention',
  rejected: 'Refused',
}

export interface Hl7MessageSummary {
  id: number
  receivedAt: string
  controlId: string
  sender: string
  messageType: string
  version: string
  outcome: Hl7Outcome
  ackCode: string
  errorCode: string | null
  errorText: string | null
  patientMrn: string | null
  needsAttention: boolean
  attempts: number
}

/** One record a message changed (a result added, corrected or voided; a date moved; a name changed). */
export interface Hl7Change {
  kind: string
  referralId?: number
  patientId?: number
  resultId?: number
  analyte?: string
  detail?: string
}

export interface Hl7Segment {
  name: string
  fields: string[]
}

export interface Hl7MessageDetail extends Hl7MessageSummary {
  segments: Hl7Segment[]
  ack: string
  changes: Hl7Change[]
}

export interface Hl7ListenerState {
  enabled: boolean
  listening: boolean
  host: string
  port: number | null
  connections: number
  maxMessageBytes: number
  retentionDays: number
}

export interface Hl7Overview {
  listener: Hl7ListenerState
  perHour: { hour: string; count: number }[]
  attention: number
  /** The last 24 hours by outcome, and by error code for those not stored (no patient data). */
  outcomes: { outcome: Hl7Outcome; count: number }[]
  errorCodes: { code: string; count: number }[]
}

/**
 * `patientDetail` false: the reader holds no clinical role, so each item's `patientMrn` and
 * `errorText` are null (the error code stays) and the search matched control ids only.
 */
export interface Hl7MessagePage {
  items: Hl7MessageSummary[]
  total: number
  patientDetail: boolean
}
