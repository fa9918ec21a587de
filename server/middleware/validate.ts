import type { RequestHandler } from 'express'
import { ValidationError, type AnyObjectSchema, type InferType } from 'yup'
import { Invalid } from '../errors'

export function toInvalid(err: ValidationError): Invalid {
  const inner = err.inner.length ? err.inner : [err]
  const fields: Record<string, string> = {}
  for (const e of inner) fields[e.path || '_'] ??= e.message
  return new Invalid(inner[0]!.message, fields)
}

/**
 * Keys named like Object.prototype members. yup looks each input key up in a plain object of
 * fields, so `{"toString": 1}` finds the inherited function and throws a TypeError (a 500);
 * other code that indexes a table by user input has the same trap. No payload of ours uses them.
 */
const SHADOWING = new Set([...Object.getOwnPropertyNames(Object.prototype), 'prototype'])
const MAX_DEPTH = 32

function screen(value: unknown, path: string, depth: number): void {
  if (value === null || typeof value !== 'object') return
  if (depth > MAX_DEPTH) throw new Invalid(`The input is nested more than ${MAX_DEPTH} levels deep`, { [path || '_']: 'Nested too deeply' })
  for (const key of Object.keys(value)) {
    const at = path ? `${path}.${key}` : key
    if (SHADOWING.has(key)) throw new Invalid(`The field "${at}" is not accepted`, { [at]: 'This field name is not accepted' })
    screen((value as Record<string, unknown>)[key], at, depth + 1)
  }
}

/** Throws Invalid naming the first key that shadows an Object.prototype member, or on absurd nesting. */
export function screenKeys(value: unknown): void {
  screen(value, '', 0)
}

/** Every body and query string is screened once, right after parsing, whichever route it reaches. */
export const screenRequest: RequestHandler = (req, _res, next) => {
  screenKeys(req.query)
  screenKeys(req.body)
  next()
}

/**
 * The one way input meets a schema: screened, cast, unknown keys stripped. Routes that parse
 * their own input (multipart fields) call it after parsing.
 */
export async function validateInput<S extends AnyObjectSchema>(schema: S, input: unknown): Promise<InferType<S>> {
  screenKeys(input)
  try {
    return await schema.validate(input ?? {}, { abortEarly: false, stripUnknown: true })
  } catch (err) {
    if (err instanceof ValidationError) throw toInvalid(err)
    // yup's transforms (trim, lowercase) call string methods on whatever arrived: an object or an
    // array where text belongs throws a TypeError. Without transforms (strict), the type checks
    // name the fields that hold the wrong kind of value.
    if (err instanceof TypeError) throw await wrongTypes(schema, input)
    throw err
  }
}

const article = (type: string) => (/^[aeiou]/.test(type) ? `an ${type}` : `a ${type}`)

async function wrongTypes(schema: AnyObjectSchema, input: unknown): Promise<Invalid> {
  try {
    await schema.validate(input ?? {}, { abortEarly: false, stripUnknown: true, strict: true })
  } catch (err) {
    if (err instanceof ValidationError) {
      // yup's own type message repeats the value, which may be huge: name the field and the type.
      for (const e of err.inner) if (e.type === 'typeError') e.message = `${e.path} must be ${article(String(e.params?.type))}`
      return toInvalid(err)
    }
  }
  return new Invalid('A field holds a value of the wrong type (a list or an object where text or a number belongs)')
}

/**
 * Replaces req.body with the schema's cast, unknown keys stripped: only the schema's fields remain, so a route
 * passes it to its service whole, typed by the schema's InferType (`req.body as CreatePatientInput`).
 */
export function validate(schema: AnyObjectSchema, where: 'body' | 'query' = 'body'): RequestHandler {
  if (where === 'query') return validateQuery(schema)
  return async (req, _res, next) => {
    req.body = await validateInput(schema, req.body)
    next()
  }
}

const QUERY_MEMO_SIZE = 500

/**
 * A poll sends the same query string every few seconds, and yup's cast of it was a thirtieth of a
 * worklist request's server CPU. The query schemas are pure (the same text always casts to the
 * same value), so each route keeps the values of the query strings it has accepted; each request
 * gets its own copy. Refused strings, and strings longer than any poll's, are not kept: they are validated again and refused again.
 */
function validateQuery(schema: AnyObjectSchema): RequestHandler {
  const accepted = new Map<string, unknown>()
  return async (req, res, next) => {
    const at = req.originalUrl.indexOf('?')
    const text = at < 0 ? '' : req.originalUrl.slice(at + 1)
    let value = accepted.get(text)
    if (value === undefined) {
      value = await validateInput(schema, req.query)
      if (accepted.size >= QUERY_MEMO_SIZE) accepted.clear()
      if (text.length <= 500) accepted.set(text, value)
    }
    res.locals.query = structuredClone(value)
    next()
  }
}
