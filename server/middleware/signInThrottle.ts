import type { RequestHandler } from 'express'
import type { Config } from '../config'
import { clientAddress } from '../auth/passport'
import { countSignInAttempt } from '../services/signIn'
import { recordSecurityEvent } from '../services/securityEvents'
import { actorOf } from '../routes/context'
import { AppError } from '../errors'

/**
 * Mounted ahead of the CSRF check, the input screen and the schema, so every POST to the sign-in
 * route counts against the throttle, however malformed (an over-long e-mail, hostile keys). A
 * lockout is refused here, so it is recorded here too.
 */
export function signInThrottle(config: Config): RequestHandler {
  return async (req, _res, next) => {
    if (req.method !== 'POST') return next()
    const body: unknown = req.body
    const email = body && typeof body === 'object' && Object.hasOwn(body, 'email') ? (body as { email: unknown }).email : undefined
    try {
      await countSignInAttempt(config, email, clientAddress(req))
    } catch (err) {
      if (err instanceof AppError && err.status === 429) {
        const typed = typeof email === 'string' ? email.slice(0, 190) : ''
        await recordSecurityEvent(actorOf(req), 'sign-in-locked-out', 'login', { email: typed, reason: err.code })
      }
      throw err
    }
    next()
  }
}
