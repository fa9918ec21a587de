import type { Request } from 'express'
import type { Viewer } from '../services/viewer'
import { signedInActor } from './context'

/** The caller as clinical services see them; only valid behind an access rule that needs sign-in. */
export function viewerOf(req: Request): Viewer {
  return { ...signedInActor(req), role: req.user!.role }
}
