import type { ErrorRequestHandler, Request, RequestHandler } from 'express'
import { ValidationError } from 'yup'
import { BaseError } from 'sequelize'
import { AppError, NotFound } from '../errors'
import { isDatabaseUnavailable, RETRY_AFTER_SECONDS } from '../dbUnavailable'
import { toInvalid } from './validate'
import { isRetryableConflict } from '../unitOfWork'
import { recordSecurityEvent } from '../services/securityEvents'
import { actorOf } from '../routes/context'
import type { AppMetrics } from '../observability/metrics'

/**
 * An unexpected error goes to the log as its class, its codes and where it was thrown (safeError).
 * Never its message, SQL or parameters: a database error carries the values of the statement
 * that failed, and those are patient data (ASVS 7.1.1).
 */
function logUnexpected(req: Request, err: unknown, msg: string): void {
  req.log.error({ requestId: req.id, err }, msg)
}

function countDatabaseError(req: Request, kind: 'unavailable' | 'query'): void {
  ;(req.app.locals.metrics as AppMetrics | undefined)?.databaseError(kind)
}

/** A 403 (a role refusal or a CSRF refusal) is a security event: it goes to the audit trail. */
async function recordRefusal(req: Request, e: AppError): Promise<void> {
  const action = e.code === 'csrf_invalid' ? 'csrf-refused' : 'forbidden'
  await recordSecurityEvent(actorOf(req), action, `${req.method} ${req.baseUrl}${req.path}`, {
    code: e.code,
    route: `${req.method} ${req.originalUrl.split('?')[0]}`.slice(0, 300),
  }).catch((auditErr: unknown) => logUnexpected(req, auditErr, 'could not record a refusal in the audit trail'))
}

// An outage answers every request with a 503; one log line every few seconds says so without
// flooding the log.
let outageLoggedAt = 0
let outageUnlogged = 0
function logOutage(req: Request, err: Error): void {
  outageUnlogged += 1
  if (Date.now() - outageLoggedAt < RETRY_AFTER_SECONDS * 1000) return
  req.log.error(
    { requestId: req.id, err, answered503: outageUnlogged },
    'database unavailable: requests answered 503 since the last such line',
  )
  outageLoggedAt = Date.now()
  outageUnlogged = 0
}

export const apiNotFound: RequestHandler = (req, _res, next) => next(new NotFound(`The API route ${req.method} ${req.path}`))

const BODY_ERRORS: Record<string, string> = {
  'entity.parse.failed': 'The request body is not valid JSON',
  'entity.too.large': 'The request is too large',
  'charset.unsupported': "The request body's character set is not supported; send UTF-8",
  'encoding.unsupported': "The request body's content encoding is not supported",
  'request.aborted': 'The request was aborted before its body arrived',
  'request.size.invalid': 'The request body was shorter or longer than its Content-Length',
}

/**
 * The one error handler: coded errors answer as themselves; a database that cannot be reached
 * is a 503 with Retry-After (the client retries); the body parsers' refusals keep their 4xx;
 * a 403 is recorded in the audit trail; anything else is a logged 500 (class and codes, no values).
 */
export const errorHandler: ErrorRequestHandler = async (err, req, res, next) => {
  // A response already streaming cannot change its status; Express closes the connection.
  if (res.headersSent) return next(err)
  let e: unknown = err
  if (e instanceof ValidationError) e = toInvalid(e)
  if (e instanceof AppError && e.status === 403) await recordRefusal(req, e)
  if (e instanceof AppError) {
    res.status(e.status).json({
      error: {
        code: e.code,
        message: e.message,
        ...(e.fields ? { fields: e.fields } : {}),
        ...(e.details ? { details: e.details } : {}),
      },
    })
    return
  }
  if (isDatabaseUnavailable(err)) {
    countDatabaseError(req, 'unavailable')
    logOutage(req, err as Error)
    res.set('Retry-After', String(RETRY_AFTER_SECONDS))
    res
      .status(503)
      .json({ error: { code: 'unavailable', message: 'Ferrolane cannot reach its database just now; try again in a few seconds' } })
    return
  }
  // A deadlock or a lost cluster certification that was not (or no longer) retried: nothing of the
  // request was saved, and sending it again is the whole remedy.
  if (isRetryableConflict(err)) {
    res.status(409).json({
      error: {
        code: 'write_conflict',
        message: 'Another change to the same records was being saved at the same moment, so nothing was saved; please try again',
      },
    })
    return
  }
  const { status, type, expose } = err as { status?: number; type?: string; expose?: boolean }
  if (typeof status === 'number' && status >= 400 && status < 500 && expose) {
    const code = status === 413 ? 'too_large' : type === 'entity.parse.failed' ? 'invalid_json' : 'bad_request'
    res.status(status).json({ error: { code, message: BODY_ERRORS[type ?? ''] ?? 'The request could not be read' } })
    return
  }
  if (err instanceof BaseError) countDatabaseError(req, 'query')
  logUnexpected(req, err, 'unexpected error')
  res.status(500).json({ error: { code: 'internal', message: `Something went wrong on our side (reference ${req.id})` } })
}
