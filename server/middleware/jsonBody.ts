import express, { type RequestHandler } from 'express'
import sjson from 'secure-json-parse'
import { AppError } from '../errors'

export interface JsonBodyOptions {
  limit: string | number
  /** Media types read as JSON (default application/json). */
  type?: string[]
}

/**
 * JSON bodies through secure-json-parse instead of JSON.parse: a `__proto__` or
 * `constructor.prototype` key is refused with a 400 before any code can merge it into an object.
 * The text parser still owns charset, size limit and content type.
 */
export function jsonBody(opts: JsonBodyOptions): RequestHandler[] {
  const text = express.text({ type: opts.type ?? ['application/json'], limit: opts.limit })
  const parse: RequestHandler = (req, _res, next) => {
    if (typeof req.body !== 'string') return next()
    const raw = req.body.trim()
    if (raw === '') {
      req.body = {}
      return next()
    }
    // Strict, like body-parser: a bare string or number is not a request body.
    if (raw[0] !== '{' && raw[0] !== '[') return next(new AppError('invalid_json', 'The request body must be a JSON object', 400))
    req.body = parseJsonText(raw, () => new AppError('invalid_json', 'The request body is not valid JSON', 400))
    next()
  }
  return [text, parse]
}

/** JSON text from a client (a body, a multipart field, an uploaded file), prototype keys refused. */
export function parseJsonText(raw: string, notJson: () => AppError): unknown {
  try {
    return sjson.parse(raw, null, { protoAction: 'error', constructorAction: 'error' })
  } catch (err) {
    if (err instanceof SyntaxError && /forbidden prototype property/i.test(err.message)) {
      throw new AppError('invalid_json', 'The JSON may not contain a "__proto__" or "constructor.prototype" key', 400)
    }
    throw notJson()
  }
}
