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
import { AppError, Forbidden } from '../errors'
import { hasSecondFactor } from '../services/secondFactor'
import { endSessionUrl as providerEndSessionUrl } from '../auth/oidcClient'
import type { CsrfTokenAnswer, PasswordChanged, SignInAnswer, SignOutAnswer } from '../../shared/auth/views'
import type { SessionUser } from '../../shared/types'
import { allows } from '../../shared/permissions'

/** passport regenerates the session id in req.login, so a fixated id is worthless. */
export async function completeSignIn(req: Request, user: SessionUser, how: Record<string, string>): Promise<void> {
  await new Promise<void>((resolve, reject) => req.login(user, (err) => (err ? reject(err) : resolve())))
  markSignedIn(req)
  await recordAudit(null, { ...actorOf(req), userId: user.id }, { action: 'sign-in', entity: 'session', entityId: user.id, after: how })
}

function authenticate(passport: PassportStatic, req: Request, res: Response, next: NextFunction): Promise<SessionUser | null> {
  return new Promise((resolve, reject) => {
    passport.authenticate('local', (err: unknown, user: SessionUser | false) => (err ? reject(err) : resolve(user || null)))(req, res, next)
  })
}

export function authRoutes(ctx: AppContext, passport: PassportStatic): ApiRouter {
  const api = new ApiRouter('/api/auth')

  api.get('/csrf', { action: 'auth.signIn' }, (req, res) => {
    const answer: CsrfTokenAnswer = { csrfToken: csrfTokenFor(req) }
    res.json(answer)
  })

  api.post('/login', { action: 'auth.signIn' }, validate(loginSchema), async (req, res, next) => {
    const mode = ctx.config.localSignIn
    const directory = ctx.config.oidc?.displayName ?? 'the hospital directory'
    if (mode === 'off')
      throw new Forbidden(`Sign-in with a Ferrolane password is switched off; use Sign in with ${directory}`, 'local_sign_in_off')
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
    if (mode === 'admins-only' && !allows(user.role, 'auth.passwordWhenDirectory')) {
      throw new Forbidden(`Ferrolane passwords are kept for administrators; use Sign in with ${directory}`, 'local_sign_in_admins_only')
    }
    if (await hasSecondFactor(user.id)) {
      // Not signed in yet: the next request must bring the authenticator or a recovery code.
      req.session.pendingSecondFactor = { userId: user.id, email: user.email, at: Date.now() }
      const answer: SignInAnswer = { secondFactorRequired: true, csrfToken: csrfTokenFor(req) }
      return void res.json(answer)
    }
    await completeSignIn(req, user, { via: 'password' })
    const enrol = user.role === 'admin' && ctx.config.adminSecondFactorRequired
    if (enrol) req.session.secondFactorEnrolmentRequired = true
    const answer: SignInAnswer = { user, csrfToken: csrfTokenFor(req), ...(enrol ? { secondFactorEnrolmentRequired: true } : {}) }
    res.json(answer)
  })

  api.post('/logout', { action: 'auth.account', duringPasswordChange: true }, async (req, res) => {
    const actor = signedInActor(req)
    const idToken = req.session.directoryIdToken
    await new Promise<void>((resolve, reject) => req.logout((err) => (err ? reject(err) : resolve())))
    await new Promise<void>((resolve, reject) => req.session.destroy((err) => (err ? reject(err) : resolve())))
    // A directory session ends at the provider too (RP-initiated logout): the client goes there next.
    const endSessionUrl = idToken && ctx.config.oidc ? await providerEndSessionUrl(ctx.config.oidc, idToken).catch(() => null) : null
    await recordAudit(null, actor, {
      action: 'sign-out',
      entity: 'session',
      entityId: actor.userId,
      after: idToken ? { via: 'directory', providerSignOut: Boolean(endSessionUrl) } : null,
    })
    res.clearCookie('ferrolane.sid')
    if (!idToken) return void res.status(204).end()
    const answer: SignOutAnswer = { endSessionUrl }
    res.json(answer)
  })

  api.get('/me', { action: 'auth.account', duringPasswordChange: true }, (req, res) => {
    res.json(req.session.secondFactorEnrolmentRequired ? { ...req.user, secondFactorEnrolmentRequired: true } : req.user)
  })

  api.post('/password', { action: 'auth.account', duringPasswordChange: true }, async (req, res) => {
    const user = await changeOwnPassword(ctx.sequelize, signedInActor(req), req.body)
    // Every session of the user is gone (the service deleted them); passport's login regenerates
    // this one under a new id, so a session id seen before the change is worthless (ASVS 3.3.3).
    await new Promise<void>((resolve, reject) => req.login(user, (err) => (err ? reject(err) : resolve())))
    markSignedIn(req)
    const answer: PasswordChanged = { user, csrfToken: csrfTokenFor(req) }
    res.json(answer)
  })

  return api
}
