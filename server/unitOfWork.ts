import type { Sequelize, Transaction } from 'sequelize'
import { isDatabaseUnavailable } from './dbUnavailable'

/**
 * Server error numbers after which the whole transaction has been rolled back (or never
 * started), so running the unit of work again from the top is safe:
 * - 1213 ER_LOCK_DEADLOCK: an InnoDB deadlock victim, and on Galera also a transaction that
 *   lost certification at COMMIT or was aborted by a replicated write ("wsrep aborted
 *   transaction"), both reported with this number and SQLSTATE 40001;
 * - 1205 ER_LOCK_WAIT_TIMEOUT: the statement waited too long for a row lock (the helper rolls
 *   the rest of the transaction back before trying again);
 * - 1047 ER_UNKNOWN_COM_ERROR: "WSREP has not yet prepared node for application use", a node
 *   outside the primary component refusing the statement before doing anything.
 * Not 1180 (error during COMMIT): whether the commit happened is not known, so it is not retried.
 */
export const RETRYABLE_ERRNOS = new Set([1213, 1205, 1047])

export function isRetryableConflict(err: unknown): boolean {
  let e = err as { errno?: unknown; parent?: unknown; original?: unknown; cause?: unknown } | null
  for (let depth = 0; e && typeof e === 'object' && depth < 6; depth += 1) {
    if (typeof e.errno === 'number' && RETRYABLE_ERRNOS.has(e.errno)) return true
    e = (e.parent ?? e.original ?? e.cause ?? null) as typeof e
  }
  return false
}

export interface UnitOfWorkOptions {
  /**
   * The caller's promise that the unit's only effects are the statements inside this
   * transaction (no e-mail sent, no file written, no input stream consumed), so that a run
   * rolled back by the server can be replayed whole. Only such units are retried.
   */
  idempotent: boolean
  /** Total tries, the first included; bounded so a hot row cannot hold a request forever. */
  attempts?: number
  /**
   * Also run again when the database could not be reached or the connection broke (a Galera
   * node killed, HAProxy moving the writer route), for at most this long from the first try.
   * The commit's fate is then unknown, so the unit must also be safe to run after a commit that
   * did happen (a conditional UPDATE that then matches nothing). For short writes whose loss
   * costs more than a wait: the outbox recording that the relay took a message.
   */
  reconnectForMs?: number
}

const DEFAULT_ATTEMPTS = 4
const BASE_DELAY_MS = 25
const RECONNECT_BASE_DELAY_MS = 250
const RECONNECT_MAX_DELAY_MS = 2000

const pause = (ms: number) => new Promise((r) => setTimeout(r, ms))

/**
 * Runs `work` in one transaction. When the server rolls it back for a deadlock, a lock wait or a
 * lost certification and the unit is idempotent, it is run again after a short random pause
 * (so two conflicting requests do not collide again in step), up to `attempts` times; with
 * `reconnectForMs`, also while the database is unreachable, until that time is up. This is the
 * one place that retries; a unit that is not idempotent gets the error on the first loss.
 */
export async function unitOfWork<T>(sequelize: Sequelize, opts: UnitOfWorkOptions, work: (t: Transaction) => Promise<T>): Promise<T> {
  const attempts = opts.idempotent ? Math.max(1, opts.attempts ?? DEFAULT_ATTEMPTS) : 1
  const reconnectUntil = opts.idempotent && opts.reconnectForMs ? Date.now() + opts.reconnectForMs : 0
  for (let attempt = 1, conflicts = 0; ; attempt += 1) {
    try {
      return await sequelize.transaction((t) => work(t))
    } catch (err) {
      if (isRetryableConflict(err) && (conflicts += 1) < attempts) {
        await pause(BASE_DELAY_MS * 2 ** (conflicts - 1) * (0.5 + Math.random()))
        continue
      }
      // A failover: HAProxy needs a few seconds to mark the dead node down, so wait a little longer each time.
      const wait = Math.min(RECONNECT_MAX_DELAY_MS, RECONNECT_BASE_DELAY_MS * attempt)
      if (!(isDatabaseUnavailable(err) || isRetryableConflict(err)) || Date.now() + wait > reconnectUntil) throw err
      await pause(wait)
    }
  }
}
