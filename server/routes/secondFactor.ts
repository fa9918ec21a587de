import { ApiRouter } from './apiRouter'
import { actorOf, signedInActor, type AppContext } from './context'
import { completeSignIn } from './auth'
import { validate } from '../middleware/validate'
import { csrfTokenFor } from '../middleware/csrf'
import { clientAddress } from '../auth/passport'
import { secondFactorCodeSchema } from '../../shared/schemas/auth'
import { beginEnrolment, confirmEnrolment, secondFactorStatus, verifySecondFactor } from '../services/secondFactor'
import { checkSecondFactorThrottle, clearSecondFactorFailures, countSecondFactorFailure } from '../services/signIn'
import { findActiveUser } from '../services/users'
import { recordAudit } from '../services/audit'
import { AppError, RuleRefused } from '../errors'
import type { SecondFactorStatus, SignInAnswer } from '../../shared/auth/views'

declare module 'express-session' {
  interface SessionData {
    /** Password accepted, authenticator code still due. */
    pendingSecondFactor?: { userId: number; email: string; at: number }
    /** An admin signed in with a password who must enrol before doing anything else. */
    secondFactorEnrolmentRequired?: boolean
    /** The secret being enrolled, until a code from it is confirmed. */
    enrolmentSecret?: string
  }
}

// Long enough to open an authenticator app, short enough that a forgotten tab does not stay half signed in.
const PENDING_MS = 5 * 60_000

export function secondFactorRoutes(ctx: AppContext): ApiRouter {
  const api = new ApiRouter('/api/auth')

  api.post('/login/second-factor', { action: 'auth.signIn' }, validate(secondFactorCodeSchema), async (req, res) => {
    const pending = req.session.pendingSecondFactor
    if (!pending || Date.now() - pending.at > PENDING_MS) {
      delete req.session.pendingSecondFactor
      throw new AppError('no_pending_sign_in', 'Sign in with your e-mail and password first', 401)
    }
    const ip = clientAddress(req)
    await checkSecondFactorThrottle(ctx.config, pending.email, ip)
    const how = await verifySecondFactor(ctx.sequelize, pending.userId, req.body.code)
    const user = how ? await findActiveUser(pending.userId) : null
    if (!how || !user) {
      await countSecondFactorFailure(ctx.config, pending.email)
      await recordAudit(
        null,
        { ...actorOf(req), userId: pending.userId },
        {
          action: 'sign-in-refused',
          entity: 'session',
          entityId: pending.userId,
          after: { via: 'password', reason: 'wrong second-factor code' },
        },
      )
      throw new AppError('invalid_code', 'That code is not right, or was already used', 401)
    }
    delete req.session.pendingSecondFactor
    await clearSecondFactorFailures(pending.email, ip)
    await completeSignIn(req, user, { via: 'password', secondFactor: how })
    const answer: SignInAnswer = { user, csrfToken: csrfTokenFor(req) }
    res.json(answer)
  })

  api.get('/second-factor', { action: 'auth.account', duringPasswordChange: true }, async (req, res) => {
    const status = await secondFactorStatus(req.user!.id)
    const answer: SecondFactorStatus = { ...status, required: Boolean(req.session.secondFactorEnrolmentRequired) }
    res.json(answer)
  })

  api.post('/second-factor/enrolment', { action: 'auth.account', duringPasswordChange: true }, async (req, res) => {
    if (req.session.directoryIdToken)
      throw new RuleRefused('You signed in through the directory, which looks after your second factor', 'directory_session')
    const enrolment = await beginEnrolment(req.user!.email)
    req.session.enrolmentSecret = enrolment.secret
    res.json(enrolment)
  })

  api.post(
    '/second-factor/enrolment/confirm',
    { action: 'auth.account', duringPasswordChange: true },
    validate(secondFactorCodeSchema),
    async (req, res) => {
      const secret = req.session.enrolmentSecret
      if (!secret) throw new RuleRefused('Start the enrolment first: no QR code was shown in this session', 'no_enrolment')
      const enrolled = await confirmEnrolment(ctx.sequelize, signedInActor(req), secret, req.body.code)
      delete req.session.enrolmentSecret
      delete req.session.secondFactorEnrolmentRequired
      res.json(enrolled)
    },
  )

  return api
}
