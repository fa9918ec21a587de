import type { Request } from 'express'
import type { Role } from '../../shared/roles'
import type { Viewer } from '../services/viewer'
import { signedInActor } from './context'

/** Every staff role may read clinical records (surgeons only their own patients, in the services). */
export const STAFF: readonly Role[] = ['admin', 'nurse', 'doctor', 'surgeon']
/** Clinical records are written by the pre-assessment nurses and clinic doctors. */
export const CLINICAL_WRITERS: readonly Role[] = ['nurse', 'doctor']

/** The caller as clinical services see them; only valid behind an access rule that needs sign-in. */
export function viewerOf(req: Request): Viewer {
  return { ...signedInActor(req), role: req.user!.role }
}
