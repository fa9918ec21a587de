import { randomBytes, timingSafeEqual } from 'node:crypto'
import type { Request, RequestHandler } from 'express'
import { Forbidden } from '../errors'

declare module 'express-session' {
  interface SessionData {
    csrfToken?: string
  }
}

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])

/** The synchroniser token for this session, created on first ask. */
export function csrfTokenFor(req: Request): string {
  req.session.csrfToken ??= randomBytes(24).toString('base64url')
  return req.session.csrfToken
}

/** Every state-changing request must echo the session's token in X-CSRF-Token. */
export const requireCsrf: RequestHandler = (req, _res, next) => {
  if (SAFE.has(req.method)) return next()
  const sent = Buffer.from(req.get('X-CSRF-Token') ?? '')
  const expected = Buffer.from(req.session?.csrfToken ?? '')
  // Compare byte lengths: a header of non-ASCII characters is longer in bytes than in characters,
  // and timingSafeEqual throws on buffers of different lengths.
  const ok = sent.length > 0 && sent.length === expected.length && timingSafeEqual(sent, expected)
  if (!ok) return next(new Forbidden('The security token is missing or out of date; reload the page and try again', 'csrf_invalid'))
  next()
}
