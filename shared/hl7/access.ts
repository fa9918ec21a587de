import type { Role } from '../roles'

/**
 * Who may do what on the HL7 Interfaces screen (issue 15, least privilege). An administrator runs
 * the interface without reading patient records: the listener, the hourly counts, the queue's
 * size, each message's type, sender, control id, outcome and error code. A raw message, its
 * segments, its patient's hospital number and its error text (which names the patient or the
 * values) are clinical data: only nurses, who clear the queue once a patient is registered,
 * read them and process a message again. The server checks this table; the screen follows it.
 */
export const HL7_ACCESS = {
  overview: ['admin', 'nurse'],
  listMessages: ['admin', 'nurse'],
  patientDetail: ['nurse'],
  readMessage: ['nurse'],
  processAgain: ['nurse'],
} as const satisfies Record<string, readonly Role[]>

export type Hl7Action = keyof typeof HL7_ACCESS

export function mayHl7(role: Role | undefined | null, action: Hl7Action): boolean {
  return role != null && (HL7_ACCESS[action] as readonly Role[]).includes(role)
}
