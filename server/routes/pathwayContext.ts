import type { Request } from 'express'
import type { Role } from '../../shared/roles'
import type { Viewer } from '../services/viewer'
import { signedInActor } from './context'

/** Every staff role: for what carries no patient data (catalogues, settings, the staff list). */
export const STAFF: readonly Role[] = ['admin', 'nurse', 'doctor', 'surgeon']
/**
 * Who reads clinical records: the clinical roles only (surgeons only their own patients, in the
 * services). Administrators keep staff, settings and the audit trail, and read no patient record
 * (least privilege, ASVS 4.1.3); an administrator who also treats patients holds a clinical account.
 */
export const CLINICAL_READERS: readonly Role[] = ['nurse', 'doctor', 'surgeon']
/** Clinical records are written by the pre-assessment nurses and clinic doctors. */
export const CLINICAL_WRITERS: readonly Role[] = ['nurse', 'doctor']

/** The caller as clinical services see them; only valid behind an access rule that needs sign-in. */
export function viewerOf(req: Request): Viewer {
  return { ...signedInActor(req), role: req.user!.role }
}
