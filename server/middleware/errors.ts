import type { ErrorRequestHandler, Request, RequestHandler } from 'express'
import { ValidationError } from 'yup'
import { AppError, NotFound } from '../errors'
import { toInvalid } from './validate'
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

export const apiNotFound: RequestHandler = (req, _res, next) => next(new NotFound(`The API route ${req.method} ${req.path}`))

/** The one error handler: coded errors answer as themselves, anything else is a logged 500. */
export const errorHandler: ErrorRequestHandler = async (err, req, res, _next) => {
  let e: unknown = err
  if (e instanceof ValidationError) e = toInvalid(e)
  if (e instanceof AppError && e.status === 403) await recordRefusal(req, e)
  if (e instanceof AppError) {
    res.status(e.status).json({ error: { code: e.code, message: e.message, ...(e.fields ? { fields: e.fields } : {}), ...(e.details ? { details: e.details } : {}) } })
    return
  }
  const status = (err as { status?: number; type?: string }).status
  if (status === 400 && (err as { type?: string }).type === 'entity.parse.failed') {
    res.status(400).json({ error: { code: 'invalid_json', message: 'The request body is not valid JSON' } })
    return
  }
  if (status === 413) {
    res.status(413).json({ error: { code: 'too_large', message: 'The request is too large' } })
    return
  }
  console.error(JSON.stringify(errorLogLine(err, req.id)))
  res.status(500).json({ error: { code: 'internal', message: `Something went wrong on our side (reference ${req.id})` } })
}
