import type { RequestHandler } from 'express'
import { PERMISSIONS, type Access, type Action } from '../../shared/permissions'
import { Forbidden, Unauthenticated } from '../errors'

/**
 * Every API route names the action it performs; there is no default. Who may do it is decided by
 * the one permission table, shared/permissions.ts.
 */
export interface AccessOptions {
  action: Action
  /** Reachable while the user still has to replace a temporary password or enrol a second factor. */
  duringPasswordChange?: boolean
}

export function authorize(opts: AccessOptions): RequestHandler {
  const access: Access = PERMISSIONS[opts.action]
  return (req, _res, next) => {
    if (access === 'public') return next()
    const user = req.user
    if (!user) return next(new Unauthenticated())
    if (user.mustChangePassword && !opts.duringPasswordChange) {
      return next(new Forbidden('Choose a new password before continuing', 'password_change_required'))
    }
    if (req.session?.secondFactorEnrolmentRequired && !opts.duringPasswordChange) {
      return next(new Forbidden('Set up your authenticator before continuing', 'second_factor_enrolment_required'))
    }
    if (access !== 'signed-in' && !access.includes(user.role)) return next(new Forbidden())
    next()
  }
}
