import type { Request, Response } from 'express'
import { ApiRouter } from './apiRouter'
import { actorOf, type AppContext } from './context'
import { authorizationUrl, finishSignIn, type PendingDirectorySignIn } from '../auth/oidcClient'
import { DirectorySignInRefused, signInFromDirectory } from '../services/directorySignIn'
import { recordAudit } from '../services/audit'
import { NotFound } from '../errors'
import { markSignedIn } from '../middleware/sessionLifetime'
import type { DirectoryRefusal, SignInProviders } from '../../shared/auth/views'

declare module 'express-session' {
  interface SessionData {
    directorySignIn?: PendingDirectorySignIn
    /** Kept for RP-initiated logout (id_token_hint); only on sessions the directory opened. */
    directoryIdToken?: string
  }
}

// Longer than any provider's sign-in page should take; a stale pending sign-in is refused.
const PENDING_MS = 10 * 60_000

function refuse(res: Response, reason: DirectoryRefusal): void {
  res.redirect(303, `/sign-in/refused?reason=${reason}`)
}

async function login(req: Request, user: Express.User): Promise<void> {
  // passport regenerates the session id here, so an id fixed before the redirect is worthless.
  await new Promise<void>((resolve, reject) => req.login(user, (err) => (err ? reject(err) : resolve())))
  // The absolute session lifetime counts from here, as for a password sign-in.
  markSignedIn(req)
}

export function directoryAuthRoutes(ctx: AppContext): ApiRouter {
  const api = new ApiRouter('/api/auth')
  const { oidc } = ctx.config

  api.get('/providers', { action: 'auth.signIn' }, (_req, res) => {
    const answer: SignInProviders = {
      local: ctx.config.localSignIn,
      directory: oidc ? { name: oidc.displayName, startUrl: '/api/auth/oidc/start' } : null,
    }
    res.json(answer)
  })

  api.get('/oidc/start', { action: 'auth.signIn' }, async (req, res) => {
    if (!oidc) throw new NotFound('Directory sign-in')
    const { url, pending } = await authorizationUrl(oidc)
    req.session.directorySignIn = pending
    res.redirect(303, url)
  })

  api.get('/oidc/callback', { action: 'auth.signIn' }, async (req, res) => {
    if (!oidc) throw new NotFound('Directory sign-in')
    const pending = req.session.directorySignIn
    // One use only: a replayed or second callback finds nothing to finish.
    delete req.session.directorySignIn
    const actor = actorOf(req)
    const query = new URL(req.originalUrl, 'http://callback.invalid').search
    if (!pending || Date.now() - pending.startedAt > PENDING_MS) return refuse(res, 'expired')
    if (typeof req.query.error === 'string') {
      await recordAudit(null, actor, {
        action: 'sign-in-refused',
        entity: 'session',
        after: { via: 'directory', reason: 'cancelled', error: req.query.error.slice(0, 100) },
      })
      return refuse(res, 'cancelled')
    }
    let who
    try {
      who = await finishSignIn(oidc, pending, query)
    } catch (err) {
      await recordAudit(null, actor, {
        action: 'sign-in-refused',
        entity: 'session',
        after: { via: 'directory', reason: 'failed', error: err instanceof Error ? err.message.slice(0, 200) : 'unknown' },
      })
      return refuse(res, 'failed')
    }
    try {
      const user = await signInFromDirectory(ctx.sequelize, oidc, actor, who)
      await login(req, user)
      req.session.directoryIdToken = who.idToken
      await recordAudit(
        null,
        { ...actor, userId: user.id },
        { action: 'sign-in', entity: 'session', entityId: user.id, after: { via: 'directory', groups: who.groups } },
      )
      res.redirect(303, '/')
    } catch (err) {
      if (!(err instanceof DirectorySignInRefused)) throw err
      await recordAudit(null, actor, {
        action: 'sign-in-refused',
        entity: 'session',
        after: { via: 'directory', reason: err.reason, email: who.email, groups: who.groups },
      })
      refuse(res, err.reason)
    }
  })

  return api
}
