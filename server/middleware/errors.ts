import type { ErrorRequestHandler, RequestHandler } from 'express'
import { ValidationError } from 'yup'
import { AppError, NotFound } from '../errors'
import { toInvalid } from './validate'

export const apiNotFound: RequestHandler = (req, _res, next) => next(new NotFound(`The API route ${req.method} ${req.path}`))

/** The one error handler: coded errors answer as themselves, anything else is a logged 500. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  let e: unknown = err
  if (e instanceof ValidationError) e = toInvalid(e)
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
  console.error(`[request ${req.id}] unexpected error`, err)
  res.status(500).json({ error: { code: 'internal', message: `Something went wrong on our side (reference ${req.id})` } })
}
