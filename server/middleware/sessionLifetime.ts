import type { Request, RequestHandler } from 'express'

declare module 'express-session' {
  interface SessionData {
    signedInAt?: number
  }
}

/** Stamps the moment of sign-in (or re-authentication) on a freshly regenerated session. */
export function markSignedIn(req: Request): void {
  req.session.signedInAt = Date.now()
}

/**
 * The idle timeout restarts with every request, so on its own a busy session would never end.
 * This caps a session at an absolute lifetime counted from sign-in (ASVS 3.3.2): past it the
 * session is thrown away and the request goes on as anonymous, so protected routes answer 401.
 * A session without a stamp (made before this rule) counts as expired.
 */
export function absoluteSessionLifetime(maxHours: number): RequestHandler {
  const maxMs = maxHours * 3_600_000
  return (req, _res, next) => {
    if (!req.user) return next()
    const at = req.session.signedInAt
    if (typeof at === 'number' && Date.now() - at < maxMs) return next()
    req.session.regenerate((err) => {
      if (err) return next(err)
      req.user = undefined
      next()
    })
  }
}
