import type { RequestHandler } from 'express'
import type { Role } from '../../shared/roles'
import { Forbidden, Unauthenticated } from '../errors'

/**
 * Every API route states who may call it; there is no default. 'public' is for the few pages
 * that patients and the sign-in form reach without an account.
 */
export type Access = 'public' | 'signed-in' | readonly Role[]

export interface AccessOptions {
  access: Access
  /** Reachable while the user still has to replace a temporary password or enrol a second factor. */
  duringPasswordChange?: boolean
}

export function authorize(opts: AccessOptions): RequestHandler {
  return (req, _res, next) => {
    if (opts.access === 'public') return next()
    const user = req.user
    if (!user) return next(new Unauthenticated())
    if (user.mustChangePassword && !opts.duringPasswordChange) {
      return next(new Forbidden('Choose a new password before continuing', 'password_change_required'))
    }
    if (req.session?.secondFactorEnrolmentRequired && !opts.duringPasswordChange) {
      return next(new Forbidden('Set up your authenticator before continuing', 'second_factor_enrolment_required'))
    }
    if (opts.access !== 'signed-in' && !opts.access.includes(user.role)) return next(new Forbidden())
    next()
  }
}
