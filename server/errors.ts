/** One small error family; the error middleware turns each into `{ error: { code, message, fields? } }`. */
export class AppError extends Error {
  constructor(
    public readonly code: string,
    message: string,
    public readonly status: number,
    public readonly fields?: Record<string, string>,
    /** Extra facts for the caller to act on (e.g. the free slots offered with a refusal). */
    public readonly details?: Record<string, unknown>,
  ) {
    super(message)
  }
}

export class Invalid extends AppError {
  constructor(message: string, fields?: Record<string, string>) {
    super('invalid_input', message, 400, fields)
  }
}

export class Unauthenticated extends AppError {
  constructor(message = 'Sign in to continue') {
    super('unauthenticated', message, 401)
  }
}

export class Forbidden extends AppError {
  constructor(message = 'Your role does not allow this', code = 'forbidden') {
    super(code, message, 403)
  }
}

export class NotFound extends AppError {
  constructor(what: string) {
    super('not_found', `${what} was not found`, 404)
  }
}

export class Conflict extends AppError {
  constructor(message: string, code = 'conflict', fields?: Record<string, string>, details?: Record<string, unknown>) {
    super(code, message, 409, fields, details)
  }
}

/** A rule of the domain forbids the action (the request itself was well formed). */
export class RuleRefused extends AppError {
  constructor(message: string, code = 'rule_refused', fields?: Record<string, string>) {
    super(code, message, 422, fields)
  }
}

export class TooMany extends AppError {
  constructor(message: string) {
    super('too_many_attempts', message, 429)
  }
}
