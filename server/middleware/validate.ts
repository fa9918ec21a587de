import type { RequestHandler } from 'express'
import { ValidationError, type AnyObjectSchema } from 'yup'
import { Invalid } from '../errors'

export function toInvalid(err: ValidationError): Invalid {
  const inner = err.inner.length ? err.inner : [err]
  const fields: Record<string, string> = {}
  for (const e of inner) fields[e.path || '_'] ??= e.message
  return new Invalid(inner[0]!.message, fields)
}

/** Replaces req.body with the schema's cast, unknown keys stripped; routes pick fields from it. */
export function validate(schema: AnyObjectSchema, where: 'body' | 'query' = 'body'): RequestHandler {
  return async (req, res, next) => {
    try {
      const value = await schema.validate(req[where] ?? {}, { abortEarly: false, stripUnknown: true })
      if (where === 'body') req.body = value
      else res.locals.query = value
      next()
    } catch (err) {
      next(err instanceof ValidationError ? toInvalid(err) : err)
    }
  }
}
