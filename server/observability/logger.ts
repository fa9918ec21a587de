import { pino, type DestinationStream, type Logger } from 'pino'
import type { IncomingMessage, ServerResponse } from 'node:http'
import type { RequestHandler, Response } from 'express'
import type { LogLevel } from '../config'

/**
 * Ferrolane's log: one JSON object per line on stdout (systemd's journal or any collector reads
 * it). What may be in it is fixed here and nowhere else: the request id, the signed-in user's id,
 * the route *pattern* (`GET /api/patients/:id`, never the raw URL, whose query may hold a name or
 * a hospital number), the status and the time taken. Never a request body, header, cookie, query
 * string, SQL statement or parameter: those carry patient data.
 */
export function createLogger(level: LogLevel, destination?: DestinationStream): Logger {
  return pino(
    {
      level,
      base: { service: 'ferrolane', pid: process.pid },
      timestamp: pino.stdTimeFunctions.isoTime,
      // A stray `err` passed to the logger is reduced to its class and codes (see safeError).
      serializers: { err: safeError, error: safeError },
    },
    destination ?? batchedStdout(),
  )
}

/** Longest a log line waits in the buffer before it is written. */
export const LOG_FLUSH_MS = 100

/**
 * stdout, written per 4 kB or every LOG_FLUSH_MS, whichever comes first. pino's default writes
 * each line on its own (a write through libuv's thread pool per request, a tenth of a busy
 * worklist request's profile). pino flushes what is left synchronously when the process exits,
 * so only a kill -9 or a power cut can lose the last tenth of a second of lines.
 */
function batchedStdout(): DestinationStream {
  const out = pino.destination({ dest: 1, minLength: 4096, sync: false })
  setInterval(() => out.flush(), LOG_FLUSH_MS).unref()
  return out
}

/** An error's class, codes and first stack frames. Its message is left out: a database error's message holds the SQL and its values. */
export function safeError(err: unknown): Record<string, unknown> {
  const e = (err ?? {}) as { name?: unknown; code?: unknown; stack?: string; original?: { code?: unknown; errno?: unknown } }
  return {
    errorClass: (err as object | null)?.constructor?.name ?? typeof err,
    name: typeof e.name === 'string' ? e.name : null,
    code: typeof e.code === 'string' || typeof e.code === 'number' ? e.code : null,
    dbCode: typeof e.original?.code === 'string' ? e.original.code : null,
    dbErrno: typeof e.original?.errno === 'number' ? e.original.errno : null,
    frames: (typeof e.stack === 'string' ? e.stack : '')
      .split('\n')
      .slice(1, 6)
      .map((line) => line.trim()),
  }
}

/** The route pattern ApiRouter stamped on the response, or a fixed word: labels stay few. */
export function routeLabel(req: IncomingMessage, res: ServerResponse): string {
  const stamped = (res as Response).locals?.routePattern as string | undefined
  if (stamped) return stamped
  const url = req.url ?? ''
  if (url === '/metrics' || url.startsWith('/metrics?')) return 'GET /metrics'
  return url.startsWith('/api/') || url === '/api' ? 'unmatched /api' : 'client files'
}

// Load balancers ask for these every few seconds; a line each would bury everything else.
const QUIET = /^\/(api\/health(\/ready)?|metrics)(\?|$)/

declare module 'http' {
  interface IncomingMessage {
    /** The app's logger bound to this request's id and method (made on first use: only errors log through it). */
    log: Logger
  }
}

/**
 * One line per finished request, at info (warn for 4xx, error for 5xx): `{ req: { id, method },
 * res: { statusCode }, route, userId, ms }`. Written by hand rather than by pino-http, which made
 * three child loggers per request (a twentieth of a worklist request's server CPU, with the
 * garbage they leave); the line and its fields are the same.
 */
export function httpLogger(logger: Logger): RequestHandler {
  return (req, res, next) => {
    let child: Logger | undefined
    Object.defineProperty(req, 'log', {
      configurable: true,
      get: () => (child ??= logger.child({ req: { id: req.id, method: req.method } })),
    })
    if (req.method === 'GET' && QUIET.test(req.url)) return next()
    const started = Date.now()
    let done = false
    const finished = () => {
      if (done) return
      done = true
      const status = res.statusCode
      const failed = status >= 500
      const line = {
        req: { id: req.id, method: req.method },
        res: { statusCode: status },
        ...(failed ? { err: safeError(new Error(`failed with status code ${status}`)) } : {}),
        route: routeLabel(req, res),
        userId: req.user?.id ?? null,
        ms: Date.now() - started,
      }
      if (failed) logger.error(line, 'request failed')
      else if (status >= 400) logger.warn(line, 'request finished')
      else logger.info(line, 'request finished')
    }
    res.once('finish', finished)
    res.once('close', finished)
    next()
  }
}
