/** What the log records, as the admin would search for it (the API's stable values, worded). */
export const AUDIT_ENTITIES = [
  'patient',
  'referral',
  'results',
  'result',
  'outcome',
  'follow-up',
  'clinic-review',
  'prescription',
  'administration',
  'readiness',
  'appointment',
  'appointment-task',
  'document',
  'documents',
  'user',
  'procedure',
  'iron-product',
  'clinic-settings',
  'infusion-session',
  'audit-trail',
  // Reads of an episode's sub-records (the services that list them) and the laboratory imports.
  'clinic-reviews',
  'prescriptions',
  'administrations',
  'projection',
  'readiness-reviews',
  'appointments',
  'import_batch',
  'import_mapping',
  // Sign-ins and refusals (failed and locked-out sign-ins, 403s, CSRF refusals).
  'session',
  'request',
  // The transfusion record and the quality report's national-audit export.
  'transfusion',
  'transfusions',
  'national-audit-export',
  // A cancelled planned operation (the surgery-date history).
  'planned-operation',
]
export const AUDIT_ACTIONS = [
  'view',
  'create',
  'update',
  'transition',
  'move',
  'cancel',
  'export',
  'download',
  'import',
  'reverse',
  'void',
  'sign-in',
  'sign-out',
  'sign-in-failed',
  'sign-in-locked-out',
  'sign-in-refused',
  'forbidden',
  'csrf-refused',
  'change-password',
  'reset-password',
]

export interface DiffLine {
  field: string
  before: string
  after: string
  changed: boolean
}

const show = (v: unknown) => (v === undefined ? '' : v === null ? '—' : typeof v === 'object' ? JSON.stringify(v) : String(v))

/** Before and after side by side, field by field; unchanged fields are kept but marked as such. */
export function auditDiff(before: Record<string, unknown> | null, after: Record<string, unknown> | null): DiffLine[] {
  const keys = [...new Set([...Object.keys(before ?? {}), ...Object.keys(after ?? {})])]
  return keys.map((field) => {
    const b = before ? before[field] : undefined
    const a = after ? after[field] : undefined
    return { field, before: show(b), after: show(a), changed: JSON.stringify(b) !== JSON.stringify(a) }
  })
}
