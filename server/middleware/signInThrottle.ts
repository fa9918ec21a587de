import type { RequestHandler } from 'express'
import type { Config } from '../config'
import { clientAddress } from '../auth/passport'
import { countSignInAttempt } from '../services/signIn'

/**
 * Mounted ahead of the CSRF check, the input screen and the schema, so every POST to the sign-in
 * route counts against the throttle, however malformed (an over-long e-mail, hostile keys).
 */
export function signInThrottle(config: Config): RequestHandler {
  return async (req, _res, next) => {
    if (req.method !== 'POST') return next()
    const body: unknown = req.body
    const email = body && typeof body === 'object' && Object.hasOwn(body, 'email') ? (body as { email: unknown }).email : undefined
    await countSignInAttempt(config, email, clientAddress(req))
    next()
  }
}
