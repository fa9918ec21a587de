import { Passport } from 'passport'
import { Strategy as LocalStrategy } from 'passport-local'
import type { Request } from 'express'
import type { SessionUser } from '../../shared/types'
import { checkCredentials, BAD_CREDENTIALS } from '../services/signIn'
import { findActiveUser } from '../services/users'

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends SessionUser {}
  }
}

export function clientAddress(req: Request): string {
  return req.ip ?? req.socket.remoteAddress ?? 'unknown'
}

/** One Passport per app instance, so two apps in one test process do not share strategies. */
export function createPassport(): InstanceType<typeof Passport> {
  const passport = new Passport()
  passport.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password', passReqToCallback: true }, (req, email, password, done) => {
      checkCredentials(email, password, clientAddress(req))
        .then((user) => (user ? done(null, user) : done(null, false, { message: BAD_CREDENTIALS })))
        .catch(done)
    }),
  )
  passport.serializeUser((user, done) => done(null, (user as SessionUser).id))
  // Looked up on every request: a deactivated account's open session stops working at once.
  passport.deserializeUser((id: number, done) => {
    findActiveUser(id)
      .then((user) => done(null, user ?? false))
      .catch(done)
  })
  return passport
}
