import type { ErrorRequestHandler, RequestHandler } from 'express'
import { ValidationError } from 'yup'
import { AppError, NotFound } from '../errors'
import { isDatabaseUnavailable, RETRY_AFTER_SECONDS } from '../dbUnavailable'
import { toInvalid } from './validate'

// An outage answers every request with a 503; one log line every few seconds says so without
// flooding the log.
let outageLoggedAt = 0
let outageUnlogged = 0
function logOutage(requestId: string, err: Error): void {
  outageUnlogged += 1
  if (Date.now() - outageLoggedAt < RETRY_AFTER_SECONDS * 1000) return
  console.error(`[request ${requestId}] database unavailable (${outageUnlogged} request(s) answered 503 since the last line): ${err.name}: ${err.message}`)
  outageLoggedAt = Date.now()
  outageUnlogged = 0
}

export const apiNotFound: RequestHandler = (req, _res, next) => next(new NotFound(`The API route ${req.method} ${req.path}`))

const BODY_ERRORS: Record<string, string> = {
  'entity.parse.failed': 'The request body is not valid JSON',
  'entity.too.large': 'The request is too large',
  'charset.unsupported': 'The request body\'s character set is not supported; send UTF-8',
  'encoding.unsupported': 'The request body\'s content encoding is not supported',
  'request.aborted': 'The request was aborted before its body arrived',
  'request.size.invalid': 'The request body was shorter or longer than its Content-Length',
}

/**
 * The one error handler: coded errors answer as themselves; a database that cannot be reached
 * is a 503 with Retry-After (the client retries); the body parsers' refusals keep their 4xx;
 * anything else is a logged 500.
 */
export const errorHandler: ErrorRequestHandler = (err, req, res, next) => {
  // A response already streaming cannot change its status; Express closes the connection.
  if (res.headersSent) return next(err)
  let e: unknown = err
  if (e instanceof ValidationError) e = toInvalid(e)
  if (e instanceof AppError) {
    res.status(e.status).json({ error: { code: e.code, message: e.message, ...(e.fields ? { fields: e.fields } : {}), ...(e.details ? { details: e.details } : {}) } })
    return
  }
  if (isDatabaseUnavailable(err)) {
    logOutage(req.id, err as Error)
    res.set('Retry-After', String(RETRY_AFTER_SECONDS))
    res.status(503).json({ error: { code: 'unavailable', message: 'Ferrolane cannot reach its database just now; try again in a few seconds' } })
    return
  }
  const { status, type, expose } = err as { status?: number; type?: string; expose?: boolean }
  if (typeof status === 'number' && status >= 400 && status < 500 && expose) {
    const code = status === 413 ? 'too_large' : type === 'entity.parse.failed' ? 'invalid_json' : 'bad_request'
    res.status(status).json({ error: { code, message: BODY_ERRORS[type ?? ''] ?? 'The request could not be read' } })
    return
  }
  console.error(`[request ${req.id}] unexpected error`, err)
  res.status(500).json({ error: { code: 'internal', message: `Something went wrong on our side (reference ${req.id})` } })
}
