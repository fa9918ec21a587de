import type { Role } from './roles'

/**
 * Who may do what: the one table that the API (every route names an action), the client's router
 * guards and every button read. 'public' is for the few pages patients and the sign-in form reach
 * without an account; 'signed-in' is any staff role.
 *
 * Least privilege (issue 15): administrators keep staff accounts, settings, catalogues, infusion
 * sessions, aggregate report figures and the audit trail, and read no patient record; an
 * administrator who also treats patients holds a clinical account. Surgeons read only their own
 * patients (`isOperatingSurgeon`, checked in the services).
 */
export type Access = 'public' | 'signed-in' | readonly Role[]

const STAFF = ['admin', 'nurse', 'doctor', 'surgeon'] as const
const CLINICAL = ['nurse', 'doctor', 'surgeon'] as const
/** Clinical records are written by the pre-assessment nurses and the clinic doctors. */
const RECORD_KEEPERS = ['nurse', 'doctor'] as const

export const PERMISSIONS = {
  // Sign-in and the account itself.
  'health.read': 'public',
  'auth.signIn': 'public', // the form, directory sign-in and the second-factor code come before a session exists
  'auth.account': 'signed-in', // sign out, who am I, own password and authenticator
  // LOCAL_SIGN_IN=admins-only: a Ferrolane password is break-glass access for administrators only.
  'auth.passwordWhenDirectory': ['admin'],
  'replies.answer': 'public', // patients answer their appointment e-mail through a signed link

  // Reference data every signed-in person reads (no patient in it).
  'staff.list': 'signed-in',
  'procedures.read': 'signed-in',
  'clinicProfile.read': 'signed-in',
  'formulary.read': STAFF,
  'settings.read': STAFF,

  // Administration.
  'users.manage': ['admin'],
  'procedures.manage': ['admin'],
  'formulary.manage': ['admin'],
  'settings.manage': ['admin'], // clinic thresholds change every patient's verdict: administrators only
  'infusionSessions.read': ['admin', 'nurse', 'doctor'],
  'infusionSessions.manage': ['admin'],
  'audit.read': ['admin'], // the audit trail is read-only for everyone

  // Home screens: each role lands on its own.
  'home.screening': ['nurse'],
  'home.clinic': ['doctor'],
  'home.theatre': ['surgeon'],
  'home.administration': ['admin'],

  // The episode: patients, referrals, results and the pathway.
  'records.read': CLINICAL, // every read of a patient's record, surgeons their own patients only
  'records.write': RECORD_KEEPERS, // register a patient, open and edit a referral, its dates and flags
  'results.write': RECORD_KEEPERS,
  'pathway.move': CLINICAL, // the route; each move's own action below decides
  'operations.cancel': CLINICAL, // surgeons may cancel their own patients' operations, as they may postpone them

  // Moves on the pathway (shared/pathway/transitions.ts).
  'pathway.advance': RECORD_KEEPERS, // the routine moves: confirm screening, send to clinic, recheck, close
  'pathway.decide': ['doctor'], // clinic decisions (treat, recheck, clear) are a doctor's
  'pathway.defer': ['doctor', 'surgeon'], // postponing surgery is a clinical decision or the operating surgeon's
  'pathway.withdraw': CLINICAL, // records a fact (patient declined, operation cancelled) anyone caring for them may learn
  'pathway.recordOperation': CLINICAL,

  // The anaemia clinic and theatre readiness.
  'reviews.write': ['doctor'],
  'prescriptions.plan': ['doctor'],
  'prescriptions.sign': ['doctor'], // prescribing IV iron is a doctor's decision
  'administrations.record': RECORD_KEEPERS,
  'readiness.answer': ['surgeon'], // only the operating surgeon answers the readiness projection

  // Appointments and patient e-mail.
  'appointments.book': RECORD_KEEPERS,
  'outbox.read': RECORD_KEEPERS,
  'tasks.work': RECORD_KEEPERS,

  // After surgery.
  'outcomes.record': CLINICAL, // the operating surgeon too, for their own patients
  'transfusions.record': CLINICAL,

  // Documents and letters.
  'documents.attach': CLINICAL,
  'letters.write': RECORD_KEEPERS,

  // Reports: aggregate figures for admins, doctors and surgeons (surgeons their own).
  'reports.read': ['admin', 'doctor', 'surgeon'],
  'reports.patientRows': ['doctor', 'surgeon'], // one row per operated patient: admins see figures, not patients

  // Laboratory imports: previews name patients, so only the clinical importers upload.
  'imports.run': RECORD_KEEPERS, // upload, preview, commit and reverse
  'imports.read': ['admin', 'nurse', 'doctor'], // the batch list carries no patient
  'imports.mappingsEdit': ['admin', 'nurse'],

  // HL7 interfaces: admins run them and see counts and outcomes, never a patient; nurses read a
  // message, its hospital number and error text, and process it again after registering a patient.
  'hl7.overview': ['admin', 'nurse'],
  'hl7.listMessages': ['admin', 'nurse'],
  'hl7.patientDetail': ['nurse'],
  'hl7.readMessage': ['nurse'],
  'hl7.processAgain': ['nurse'],
} as const satisfies Record<string, Access>

export type Action = keyof typeof PERMISSIONS

export function isAction(value: unknown): value is Action {
  return typeof value === 'string' && Object.prototype.hasOwnProperty.call(PERMISSIONS, value)
}

/** The roles an action names ('public' and 'signed-in' stand for every staff role). */
export function rolesFor(action: Action): readonly Role[] {
  const access: Access = PERMISSIONS[action]
  return typeof access === 'string' ? STAFF : access
}

/** May someone holding this role do this? No role (signed out) may do only public actions. */
export function allows(role: Role | null | undefined, action: Action): boolean {
  const access: Access = PERMISSIONS[action]
  if (access === 'public') return true
  if (role == null) return false
  return access === 'signed-in' || access.includes(role)
}

/** Surgeons see only the episodes they operate on; every other role sees the whole service. */
export function seesOwnPatientsOnly(role: Role | null | undefined): boolean {
  return role === 'surgeon'
}

/**
 * The surgeon-owns-patient rule: a surgeon acts on an episode only as its operating surgeon.
 * For other roles this says nothing (false); combine it with `allows`.
 */
export function isOperatingSurgeon(user: { role: Role; userId: number }, episode: { surgeonId: number | null }): boolean {
  return user.role === 'surgeon' && episode.surgeonId === user.userId
}

/** May this person see this episode at all (after `allows(role, 'records.read')`)? */
export function maySeeEpisode(user: { role: Role; userId: number }, episode: { surgeonId: number | null }): boolean {
  return !seesOwnPatientsOnly(user.role) || isOperatingSurgeon(user, episode)
}
