import type { Action } from '../../shared/permissions'

export interface MatrixEntry {
  method: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE'
  path: string
  action: Action
}

/**
 * Every API route and the action it performs. Who may perform each action is the permission
 * table, shared/permissions.ts; the role-matrix test calls every route below with every role
 * and expects exactly what that table says. A route that is mounted but missing here fails the
 * test, and so does a route here that is not mounted or that names a different action.
 */
export const ROLE_MATRIX: MatrixEntry[] = [
  { method: 'GET', path: '/api/health', action: 'health.read' },
  // Readiness for load balancers: database reachable, migrations current, cluster node synced.
  { method: 'GET', path: '/api/health/ready', action: 'health.read' },
  { method: 'GET', path: '/api/auth/csrf', action: 'auth.signIn' },
  { method: 'POST', path: '/api/auth/login', action: 'auth.signIn' },
  { method: 'POST', path: '/api/auth/logout', action: 'auth.account' },
  { method: 'GET', path: '/api/auth/me', action: 'auth.account' },
  { method: 'POST', path: '/api/auth/password', action: 'auth.account' },
  // Directory (OpenID Connect) sign-in: reached before anyone is signed in.
  { method: 'GET', path: '/api/auth/providers', action: 'auth.signIn' },
  { method: 'GET', path: '/api/auth/oidc/start', action: 'auth.signIn' },
  { method: 'GET', path: '/api/auth/oidc/callback', action: 'auth.signIn' },
  // Second factor for local accounts: the code step comes before a session exists.
  { method: 'POST', path: '/api/auth/login/second-factor', action: 'auth.signIn' },
  { method: 'GET', path: '/api/auth/second-factor', action: 'auth.account' },
  { method: 'POST', path: '/api/auth/second-factor/enrolment', action: 'auth.account' },
  { method: 'POST', path: '/api/auth/second-factor/enrolment/confirm', action: 'auth.account' },
  { method: 'GET', path: '/api/users', action: 'users.manage' },
  { method: 'POST', path: '/api/users', action: 'users.manage' },
  { method: 'PATCH', path: '/api/users/:id', action: 'users.manage' },
  { method: 'POST', path: '/api/users/:id/reset-password', action: 'users.manage' },
  // The referral pathway.
  { method: 'GET', path: '/api/staff', action: 'staff.list' },
  { method: 'GET', path: '/api/patients', action: 'records.read' },
  { method: 'POST', path: '/api/patients', action: 'records.write' },
  { method: 'GET', path: '/api/patients/:id', action: 'records.read' },
  { method: 'PATCH', path: '/api/patients/:id', action: 'records.write' },
  { method: 'GET', path: '/api/procedures', action: 'procedures.read' },
  { method: 'POST', path: '/api/procedures', action: 'procedures.manage' },
  { method: 'PATCH', path: '/api/procedures/:code', action: 'procedures.manage' },
  { method: 'POST', path: '/api/referrals', action: 'records.write' },
  { method: 'GET', path: '/api/referrals/:id', action: 'records.read' },
  { method: 'PATCH', path: '/api/referrals/:id', action: 'records.write' },
  { method: 'POST', path: '/api/referrals/:id/transitions', action: 'pathway.move' },
  { method: 'POST', path: '/api/referrals/:id/cancellation', action: 'operations.cancel' },
  { method: 'POST', path: '/api/referrals/:id/results', action: 'results.write' },
  { method: 'GET', path: '/api/referrals/:id/results', action: 'records.read' },
  { method: 'GET', path: '/api/worklist', action: 'records.read' },
  { method: 'GET', path: '/api/worklist/counts', action: 'records.read' },
  // Anaemia clinic and theatre readiness.
  { method: 'GET', path: '/api/referrals/:id/reviews', action: 'records.read' },
  { method: 'POST', path: '/api/referrals/:id/reviews', action: 'reviews.write' },
  { method: 'POST', path: '/api/referrals/:id/dose-plan', action: 'prescriptions.plan' },
  { method: 'GET', path: '/api/referrals/:id/prescriptions', action: 'records.read' },
  { method: 'POST', path: '/api/referrals/:id/prescriptions', action: 'prescriptions.sign' },
  { method: 'GET', path: '/api/referrals/:id/administrations', action: 'records.read' },
  { method: 'POST', path: '/api/referrals/:id/administrations', action: 'administrations.record' },
  { method: 'GET', path: '/api/referrals/:id/projection', action: 'records.read' },
  { method: 'GET', path: '/api/referrals/:id/readiness', action: 'records.read' },
  { method: 'POST', path: '/api/referrals/:id/readiness', action: 'readiness.answer' },
  { method: 'GET', path: '/api/formulary', action: 'formulary.read' },
  { method: 'POST', path: '/api/formulary', action: 'formulary.manage' },
  { method: 'PATCH', path: '/api/formulary/:code', action: 'formulary.manage' },
  { method: 'PUT', path: '/api/formulary/:code/dosing-table', action: 'formulary.manage' },
  { method: 'GET', path: '/api/settings/clinic', action: 'settings.read' },
  { method: 'GET', path: '/api/clinic-profile', action: 'clinicProfile.read' },
  { method: 'PATCH', path: '/api/settings/clinic', action: 'settings.manage' },
  { method: 'GET', path: '/api/readiness', action: 'records.read' },
  // Appointments and patient e-mail.
  { method: 'POST', path: '/api/appointments', action: 'appointments.book' },
  { method: 'GET', path: '/api/appointments/:id', action: 'records.read' },
  { method: 'PATCH', path: '/api/appointments/:id', action: 'appointments.book' },
  { method: 'POST', path: '/api/appointments/:id/cancel', action: 'appointments.book' },
  { method: 'GET', path: '/api/referrals/:id/appointments', action: 'records.read' },
  { method: 'GET', path: '/api/referrals/:id/updates', action: 'records.read' },
  { method: 'GET', path: '/api/infusion-sessions', action: 'infusionSessions.read' },
  { method: 'POST', path: '/api/infusion-sessions', action: 'infusionSessions.manage' },
  { method: 'PATCH', path: '/api/infusion-sessions/:id', action: 'infusionSessions.manage' },
  { method: 'GET', path: '/api/outbox', action: 'outbox.read' },
  { method: 'GET', path: '/api/tasks', action: 'tasks.work' },
  { method: 'POST', path: '/api/tasks/:id/done', action: 'tasks.work' },
  { method: 'GET', path: '/api/replies/:token', action: 'replies.answer' },
  { method: 'POST', path: '/api/replies/:token/confirm', action: 'replies.answer' },
  { method: 'POST', path: '/api/replies/:token/rebook', action: 'replies.answer' },
  // After surgery, reports and the audit trail.
  { method: 'GET', path: '/api/referrals/:id/outcome', action: 'records.read' },
  { method: 'POST', path: '/api/referrals/:id/outcome', action: 'outcomes.record' },
  { method: 'POST', path: '/api/referrals/:id/follow-up', action: 'outcomes.record' },
  { method: 'GET', path: '/api/referrals/:id/transfusions', action: 'records.read' },
  { method: 'POST', path: '/api/referrals/:id/transfusions', action: 'transfusions.record' },
  { method: 'PUT', path: '/api/referrals/:id/transfusions/:transfusionId', action: 'transfusions.record' },
  { method: 'POST', path: '/api/referrals/:id/transfusions/:transfusionId/void', action: 'transfusions.record' },
  { method: 'GET', path: '/api/reports/quality', action: 'reports.read' },
  // Patient-level rows (one per operated episode): admins see figures, not patients.
  { method: 'GET', path: '/api/reports/quality/national-audit', action: 'reports.patientRows' },
  { method: 'GET', path: '/api/reports/:name', action: 'reports.read' },
  { method: 'GET', path: '/api/audit', action: 'audit.read' },
  // Documents, letters and the FHIR export.
  { method: 'POST', path: '/api/referrals/:id/documents', action: 'documents.attach' },
  { method: 'GET', path: '/api/referrals/:id/documents', action: 'records.read' },
  { method: 'GET', path: '/api/documents/:id', action: 'records.read' },
  { method: 'POST', path: '/api/referrals/:id/letters', action: 'letters.write' },
  { method: 'POST', path: '/api/appointments/:id/letter', action: 'letters.write' },
  { method: 'GET', path: '/api/letters/:id', action: 'records.read' },
  { method: 'GET', path: '/api/referrals/:id/fhir', action: 'records.read' },
  // Laboratory imports.
  { method: 'POST', path: '/api/imports/lab-results', action: 'imports.run' },
  { method: 'POST', path: '/api/imports/fhir', action: 'imports.run' },
  { method: 'GET', path: '/api/imports/mappings', action: 'imports.read' },
  { method: 'GET', path: '/api/imports/mappings/:source', action: 'imports.read' },
  { method: 'PUT', path: '/api/imports/mappings/:source', action: 'imports.mappingsEdit' },
  { method: 'GET', path: '/api/imports', action: 'imports.read' },
  { method: 'GET', path: '/api/imports/:id', action: 'imports.read' },
  { method: 'POST', path: '/api/imports/:id/reversal', action: 'imports.run' },
  // HL7 interfaces.
  { method: 'GET', path: '/api/interfaces/hl7', action: 'hl7.overview' },
  { method: 'GET', path: '/api/interfaces/hl7/messages', action: 'hl7.listMessages' },
  { method: 'GET', path: '/api/interfaces/hl7/messages/:id', action: 'hl7.readMessage' },
  { method: 'POST', path: '/api/interfaces/hl7/messages/:id/reprocess', action: 'hl7.processAgain' },
]
