import type { ErrorRequestHandler, Request, RequestHandler } from 'express'
import { ValidationError } from 'yup'
import { AppError, NotFound } from '../errors'
import { isDatabaseUnavailable, RETRY_AFTER_SECONDS } from '../dbUnavailable'
import { toInvalid } from './validate'
import { isRetryableConflict } from '../unitOfWork'
import { recordSecurityEvent } from '../services/securityEvents'
import { actorOf } from '../routes/context'

/**
 * What an unexpected error may put in the log: its class, its codes and where it was thrown.
 * Never its message, SQL or parameters: a database error carries the values of the statement
 * that failed, and those are patient data (ASVS 7.1.1).
 */
export function errorLogLine(err: unknown, requestId: string | undefined): Record<string, unknown> {
  const e = (err ?? {}) as { name?: string; code?: unknown; stack?: string; original?: { code?: unknown; errno?: unknown; sqlState?: unknown } }
  const frames = (e.stack ?? '').split('\n').slice(1, 6).map((line) => line.trim())
  return {
    level: 'error',
    msg: 'unexpected error',
    requestId: requestId ?? null,
    errorClass: (err as object | null)?.constructor?.name ?? typeof err,
    name: typeof e.name === 'string' ? e.name : null,
    code: typeof e.code === 'string' || typeof e.code === 'number' ? e.code : null,
    dbCode: typeof e.original?.code === 'string' ? e.original.code : null,
    dbErrno: typeof e.original?.errno === 'number' ? e.original.errno : null,
    frames,
  }
}

/** A 403 (a role refusal or a CSRF refusal) is a security event: it goes to the audit trail. */
async function recordRefusal(req: Request, e: AppError): Promise<void> {
  const action = e.code === 'csrf_invalid' ? 'csrf-refused' : 'forbidden'
  await recordSecurityEvent(actorOf(req), action, `${req.method} ${req.baseUrl}${req.path}`, { code: e.code, route: `${req.method} ${req.originalUrl.split('?')[0]}`.slice(0, 300) })
    .catch((auditErr: unknown) => console.error(JSON.stringify(errorLogLine(auditErr, req.id))))
}

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
 * a 403 is recorded in the audit trail; anything else is a logged 500 (class and codes, no values).
 */
export const errorHandler: ErrorRequestHandler = async (err, req, res, next) => {
  // A response already streaming cannot change its status; Express closes the connection.
  if (res.headersSent) return next(err)
  let e: unknown = err
  if (e instanceof ValidationError) e = toInvalid(e)
  if (e instanceof AppError && e.status === 403) await recordRefusal(req, e)
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
  // A deadlock or a lost cluster certification that was not (or no longer) retried: nothing of the
  // request was saved, and sending it again is the whole remedy.
  if (isRetryableConflict(err)) {
    res.status(409).json({ error: { code: 'write_conflict', message: 'Another change to the same records was being saved at the same moment, so nothing was saved; please try again' } })
    return
  }
  const { status, type, expose } = err as { status?: number; type?: string; expose?: boolean }
  if (typeof status === 'number' && status >= 400 && status < 500 && expose) {
    const code = status === 413 ? 'too_large' : type === 'entity.parse.failed' ? 'invalid_json' : 'bad_request'
    res.status(status).json({ error: { code, message: BODY_ERRORS[type ?? ''] ?? 'The request could not be read' } })
    return
  }
  console.error(JSON.stringify(errorLogLine(err, req.id)))
  res.status(500).json({ error: { code: 'internal', message: `Something went wrong on our side (reference ${req.id})` } })
}
