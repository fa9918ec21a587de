import type { Request, Response, NextFunction } from 'express'
import type { PassportStatic } from 'passport'
import { ApiRouter } from './apiRouter'
import { actorOf, signedInActor, type AppContext } from './context'
import { validate } from '../middleware/validate'
import { csrfTokenFor } from '../middleware/csrf'
import { markSignedIn } from '../middleware/sessionLifetime'
import { loginSchema } from '../../shared/schemas/auth'
import { changeOwnPassword } from '../services/users'
import { recordAudit } from '../services/audit'
import { recordSecurityEvent } from '../services/securityEvents'
import { AppError } from '../errors'
import type { SessionUser } from '../../shared/types'

function authenticate(passport: PassportStatic, req: Request, res: Response, next: NextFunction): Promise<SessionUser | null> {
  return new Promise((resolve, reject) => {
    passport.authenticate('local', (err: unknown, user: SessionUser | false) => (err ? reject(err) : resolve(user || null)))(req, res, next)
  })
}

export function authRoutes(ctx: AppContext, passport: PassportStatic): ApiRouter {
  const api = new ApiRouter('/api/auth')

  api.get('/csrf', { access: 'public' }, (req, res) => {
    res.json({ csrfToken: csrfTokenFor(req) })
  })

  api.post('/login', { access: 'public' }, validate(loginSchema), async (req, res, next) => {
    const email = String((req.body as { email: string }).email).slice(0, 190)
    const user = await authenticate(passport, req, res, next).catch(async (err: unknown) => {
      if (err instanceof AppError) {
        const action = err.status === 429 ? 'sign-in-locked-out' : 'sign-in-refused'
        await recordSecurityEvent(actorOf(req), action, 'login', { email, reason: err.code })
      }
      throw err
    })
    if (!user) {
      await recordSecurityEvent(actorOf(req), 'sign-in-failed', 'login', { email, reason: 'invalid_credentials' })
      throw new AppError('invalid_credentials', 'E-mail or password is not correct', 401)
    }
    // passport regenerates the session id here, so a fixated id is worthless.
    await new Promise<void>((resolve, reject) => req.login(user, (err) => (err ? reject(err) : resolve())))
    markSignedIn(req)
    await recordAudit(null, { ...actorOf(req), userId: user.id }, { action: 'sign-in', entity: 'session', entityId: user.id })
    res.json({ user, csrfToken: csrfTokenFor(req) })
  })

  api.post('/logout', { access: 'signed-in', duringPasswordChange: true }, async (req, res) => {
    const actor = signedInActor(req)
    await new Promise<void>((resolve, reject) => req.logout((err) => (err ? reject(err) : resolve())))
    await new Promise<void>((resolve, reject) => req.session.destroy((err) => (err ? reject(err) : resolve())))
    await recordAudit(null, actor, { action: 'sign-out', entity: 'session', entityId: actor.userId })
    res.clearCookie('ferrolane.sid')
    res.status(204).end()
  })

  api.get('/me', { access: 'signed-in', duringPasswordChange: true }, (req, res) => {
    res.json(req.user)
  })

  api.post('/password', { access: 'signed-in', duringPasswordChange: true }, async (req, res) => {
    const user = await changeOwnPassword(ctx.sequelize, signedInActor(req), req.body)
    // Every session of the user is gone (the service deleted them); passport's login regenerates
    // this one under a new id, so a session id seen before the change is worthless (ASVS 3.3.3).
    await new Promise<void>((resolve, reject) => req.login(user, (err) => (err ? reject(err) : resolve())))
    markSignedIn(req)
    res.json({ user, csrfToken: csrfTokenFor(req) })
  })

  return api
}
