import { ConnectionError } from 'sequelize'

/**
 * Driver and socket codes that mean "the database cannot be reached right now", as opposed to a
 * query it refused. Sequelize wraps the driver's SqlError (as .parent/.original) and some paths
 * add a .cause, so the chain is walked.
 */
const CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EPIPE',
  'ENOTFOUND',
  'EHOSTUNREACH',
  'ENETUNREACH',
  'ENOENT',
  'ESOCKET',
  'PROTOCOL_CONNECTION_LOST',
  'ER_GET_CONNECTION_TIMEOUT',
  'ER_SOCKET_UNEXPECTED_CLOSE',
  'ER_CONNECTION_ALREADY_CLOSED',
  'ER_CONNECTION_TIMEOUT',
  'ER_CMD_CONNECTION_CLOSED',
  'ER_SOCKET',
  'ER_SOCKET_TIMEOUT',
  'ER_POOL_ALREADY_CLOSED',
  'ER_CLOSING_POOL',
  'ER_ADD_CONNECTION_CLOSED_POOL',
  'ER_CMD_NOT_EXECUTED_DESTROYED',
  'ER_PING_TIMEOUT',
  'ER_INITIAL_TIMEOUT_ERROR',
  'ER_SERVER_SHUTDOWN',
  'ER_CONNECTION_KILLED',
  'ER_CON_COUNT_ERROR',
  'ER_TOO_MANY_USER_CONNECTIONS',
])
// Server-side numbers for a shutdown in progress, a killed connection, too many connections.
const ERRNOS = new Set([1040, 1053, 1077, 1927, 2002, 2003, 2006, 2013])
const NAMES = new Set(['SequelizeConnectionAcquireTimeoutError', 'TimeoutError'])

export function isDatabaseUnavailable(err: unknown): boolean {
  let e = err as { code?: unknown; errno?: unknown; name?: unknown; parent?: unknown; original?: unknown; cause?: unknown } | null
  for (let depth = 0; e && typeof e === 'object' && depth < 6; depth += 1) {
    if (e instanceof ConnectionError) return true
    if (typeof e.code === 'string' && CODES.has(e.code)) return true
    if (typeof e.errno === 'number' && ERRNOS.has(e.errno)) return true
    // sequelize-pool's acquire timeout is a plain TimeoutError from the pool, not a query's lock timeout.
    if (typeof e.name === 'string' && NAMES.has(e.name) && /acquir|ResourceRequest/i.test(String((e as Error).message))) return true
    e = (e.parent ?? e.original ?? e.cause ?? null) as typeof e
  }
  return false
}

/** Seconds a client should wait before trying again while the database is away. */
export const RETRY_AFTER_SECONDS = 5
