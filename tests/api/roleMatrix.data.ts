import type { Role } from '../../shared/roles'

const STAFF: Role[] = ['admin', 'nurse', 'doctor', 'surgeon']
/**
 * Least privilege (issue 15): administrators keep staff accounts, settings, catalogues, infusion
 * sessions, reports' aggregate figures and the audit trail, and read no patient record. Every
 * route that answers with a patient's data is for the clinical roles only.
 */
const CLINICAL: Role[] = ['nurse', 'doctor', 'surgeon']

export type Allow = 'public' | 'signed-in' | Role[]
export interface MatrixEntry { method: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE'; path: string; allow: Allow }

/**
 * Who may call each API route. This table is the specification: a route that is mounted
 * but missing here fails the role-matrix test, and so does a route here that is not mounted.
 */
export const ROLE_MATRIX: MatrixEntry[] = [
  { method: 'GET', path: '/api/health', allow: 'public' },
  // Readiness for load balancers: database reachable, migrations current, cluster node synced.
  { method: 'GET', path: '/api/health/ready', allow: 'public' },
  { method: 'GET', path: '/api/auth/csrf', allow: 'public' },
  { method: 'POST', path: '/api/auth/login', allow: 'public' },
  { method: 'POST', path: '/api/auth/logout', allow: 'signed-in' },
  { method: 'GET', path: '/api/auth/me', allow: 'signed-in' },
  { method: 'POST', path: '/api/auth/password', allow: 'signed-in' },
  // Directory (OpenID Connect) sign-in: reached before anyone is signed in.
  { method: 'GET', path: '/api/auth/providers', allow: 'public' },
  { method: 'GET', path: '/api/auth/oidc/start', allow: 'public' },
  { method: 'GET', path: '/api/auth/oidc/callback', allow: 'public' },
  // Second factor for local accounts: the code step comes before a session exists.
  { method: 'POST', path: '/api/auth/login/second-factor', allow: 'public' },
  { method: 'GET', path: '/api/auth/second-factor', allow: 'signed-in' },
  { method: 'POST', path: '/api/auth/second-factor/enrolment', allow: 'signed-in' },
  { method: 'POST', path: '/api/auth/second-factor/enrolment/confirm', allow: 'signed-in' },
  { method: 'GET', path: '/api/users', allow: ['admin'] },
  { method: 'POST', path: '/api/users', allow: ['admin'] },
  { method: 'PATCH', path: '/api/users/:id', allow: ['admin'] },
  { method: 'POST', path: '/api/users/:id/reset-password', allow: ['admin'] },
  // The referral pathway: the clinical roles read (surgeons their own patients only, checked in
  // the services); nurses and doctors write clinical records; admins keep the catalogue.
  { method: 'GET', path: '/api/staff', allow: 'signed-in' },
  { method: 'GET', path: '/api/patients', allow: [...CLINICAL] },
  { method: 'POST', path: '/api/patients', allow: ['nurse', 'doctor'] },
  { method: 'GET', path: '/api/patients/:id', allow: [...CLINICAL] },
  { method: 'PATCH', path: '/api/patients/:id', allow: ['nurse', 'doctor'] },
  { method: 'GET', path: '/api/procedures', allow: 'signed-in' },
  { method: 'POST', path: '/api/procedures', allow: ['admin'] },
  { method: 'PATCH', path: '/api/procedures/:code', allow: ['admin'] },
  { method: 'POST', path: '/api/referrals', allow: ['nurse', 'doctor'] },
  { method: 'GET', path: '/api/referrals/:id', allow: [...CLINICAL] },
  { method: 'PATCH', path: '/api/referrals/:id', allow: ['nurse', 'doctor'] },
  { method: 'POST', path: '/api/referrals/:id/transitions', allow: ['nurse', 'doctor', 'surgeon'] },
  { method: 'POST', path: '/api/referrals/:id/cancellation', allow: ['nurse', 'doctor', 'surgeon'] },
  { method: 'POST', path: '/api/referrals/:id/results', allow: ['nurse', 'doctor'] },
  { method: 'GET', path: '/api/referrals/:id/results', allow: [...CLINICAL] },
  { method: 'GET', path: '/api/worklist', allow: [...CLINICAL] },
  { method: 'GET', path: '/api/worklist/counts', allow: [...CLINICAL] },
  // Anaemia clinic and theatre readiness: doctors review and prescribe; nurses and doctors record
  // doses; only the operating surgeon answers the readiness projection; admins keep formulary and thresholds.
  { method: 'GET', path: '/api/referrals/:id/reviews', allow: [...CLINICAL] },
  { method: 'POST', path: '/api/referrals/:id/reviews', allow: ['doctor'] },
  { method: 'POST', path: '/api/referrals/:id/dose-plan', allow: ['doctor'] },
  { method: 'GET', path: '/api/referrals/:id/prescriptions', allow: [...CLINICAL] },
  { method: 'POST', path: '/api/referrals/:id/prescriptions', allow: ['doctor'] },
  { method: 'GET', path: '/api/referrals/:id/administrations', allow: [...CLINICAL] },
  { method: 'POST', path: '/api/referrals/:id/administrations', allow: ['nurse', 'doctor'] },
  { method: 'GET', path: '/api/referrals/:id/projection', allow: [...CLINICAL] },
  { method: 'GET', path: '/api/referrals/:id/readiness', allow: [...CLINICAL] },
  { method: 'POST', path: '/api/referrals/:id/readiness', allow: ['surgeon'] },
  { method: 'GET', path: '/api/formulary', allow: [...STAFF] },
  { method: 'POST', path: '/api/formulary', allow: ['admin'] },
  { method: 'PATCH', path: '/api/formulary/:code', allow: ['admin'] },
  { method: 'PUT', path: '/api/formulary/:code/dosing-table', allow: ['admin'] },
  { method: 'GET', path: '/api/settings/clinic', allow: [...STAFF] },
  { method: 'GET', path: '/api/clinic-profile', allow: 'signed-in' },
  { method: 'PATCH', path: '/api/settings/clinic', allow: ['admin'] },
  { method: 'GET', path: '/api/readiness', allow: [...CLINICAL] },
  // Appointments and patient e-mail: nurses and doctors book; every staff role reads (surgeons
  // their own patients); admins keep the infusion sessions; patients answer through public links.
  { method: 'POST', path: '/api/appointments', allow: ['nurse', 'doctor'] },
  { method: 'GET', path: '/api/appointments/:id', allow: [...CLINICAL] },
  { method: 'PATCH', path: '/api/appointments/:id', allow: ['nurse', 'doctor'] },
  { method: 'POST', path: '/api/appointments/:id/cancel', allow: ['nurse', 'doctor'] },
  { method: 'GET', path: '/api/referrals/:id/appointments', allow: [...CLINICAL] },
  { method: 'GET', path: '/api/infusion-sessions', allow: ['admin', 'nurse', 'doctor'] },
  { method: 'POST', path: '/api/infusion-sessions', allow: ['admin'] },
  { method: 'PATCH', path: '/api/infusion-sessions/:id', allow: ['admin'] },
  { method: 'GET', path: '/api/outbox', allow: ['nurse', 'doctor'] },
  { method: 'GET', path: '/api/tasks', allow: ['nurse', 'doctor'] },
  { method: 'POST', path: '/api/tasks/:id/done', allow: ['nurse', 'doctor'] },
  { method: 'GET', path: '/api/replies/:token', allow: 'public' },
  { method: 'POST', path: '/api/replies/:token/confirm', allow: 'public' },
  { method: 'POST', path: '/api/replies/:token/rebook', allow: 'public' },
  // After surgery: nurses, doctors and the operating surgeon record outcomes; reports for admins,
  // doctors and surgeons (their own figures); the audit trail is admin-only and read-only.
  { method: 'GET', path: '/api/referrals/:id/outcome', allow: [...CLINICAL] },
  { method: 'POST', path: '/api/referrals/:id/outcome', allow: ['nurse', 'doctor', 'surgeon'] },
  { method: 'POST', path: '/api/referrals/:id/follow-up', allow: ['nurse', 'doctor', 'surgeon'] },
  { method: 'GET', path: '/api/referrals/:id/transfusions', allow: [...STAFF] },
  { method: 'POST', path: '/api/referrals/:id/transfusions', allow: ['nurse', 'doctor', 'surgeon'] },
  { method: 'PUT', path: '/api/referrals/:id/transfusions/:transfusionId', allow: ['nurse', 'doctor', 'surgeon'] },
  { method: 'POST', path: '/api/referrals/:id/transfusions/:transfusionId/void', allow: ['nurse', 'doctor', 'surgeon'] },
  { method: 'GET', path: '/api/reports/quality', allow: ['admin', 'doctor', 'surgeon'] },
  // Patient-level rows (one per operated episode): admins see figures, not patients.
  { method: 'GET', path: '/api/reports/quality/national-audit', allow: ['doctor', 'surgeon'] },
  { method: 'GET', path: '/api/reports/:name', allow: ['admin', 'doctor', 'surgeon'] },
  { method: 'GET', path: '/api/audit', allow: ['admin'] },
  // Documents, letters and the FHIR export: every staff role reads and downloads (surgeons their own
  // patients); nurses, doctors and the operating surgeon attach files; nurses and doctors write letters.
  { method: 'POST', path: '/api/referrals/:id/documents', allow: ['nurse', 'doctor', 'surgeon'] },
  { method: 'GET', path: '/api/referrals/:id/documents', allow: [...CLINICAL] },
  { method: 'GET', path: '/api/documents/:id', allow: [...CLINICAL] },
  { method: 'POST', path: '/api/referrals/:id/letters', allow: ['nurse', 'doctor'] },
  { method: 'POST', path: '/api/appointments/:id/letter', allow: ['nurse', 'doctor'] },
  { method: 'GET', path: '/api/letters/:id', allow: [...CLINICAL] },
  { method: 'GET', path: '/api/referrals/:id/fhir', allow: [...CLINICAL] },
  // Laboratory imports: nurses and doctors upload, preview, commit and reverse (never a batch that
  // touches a closed episode); admins see the batch list (no patient in it) and, with nurses, keep
  // the column mappings. Surgeons read results on their episodes.
  { method: 'POST', path: '/api/imports/lab-results', allow: ['nurse', 'doctor'] },
  { method: 'POST', path: '/api/imports/fhir', allow: ['nurse', 'doctor'] },
  { method: 'GET', path: '/api/imports/mappings', allow: ['admin', 'nurse', 'doctor'] },
  { method: 'GET', path: '/api/imports/mappings/:source', allow: ['admin', 'nurse', 'doctor'] },
  { method: 'PUT', path: '/api/imports/mappings/:source', allow: ['admin', 'nurse'] },
  { method: 'GET', path: '/api/imports', allow: ['admin', 'nurse', 'doctor'] },
  { method: 'GET', path: '/api/imports/:id', allow: ['admin', 'nurse', 'doctor'] },
  { method: 'POST', path: '/api/imports/:id/reversal', allow: ['nurse', 'doctor'] },
  // HL7 interfaces (shared/hl7/access.ts): admins run them and see the listener, counts, outcomes
  // and error codes, never a patient (the list leaves out MRN and error text for them); nurses
  // read a message segment by segment and clear the attention queue after registering a patient.
  { method: 'GET', path: '/api/interfaces/hl7', allow: ['admin', 'nurse'] },
  { method: 'GET', path: '/api/interfaces/hl7/messages', allow: ['admin', 'nurse'] },
  { method: 'GET', path: '/api/interfaces/hl7/messages/:id', allow: ['nurse'] },
  { method: 'POST', path: '/api/interfaces/hl7/messages/:id/reprocess', allow: ['nurse'] },
]
