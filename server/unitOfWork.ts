import type { Sequelize, Transaction } from 'sequelize'

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
}

const DEFAULT_ATTEMPTS = 4
const BASE_DELAY_MS = 25

const pause = (ms: number) => new Promise((r) => setTimeout(r, ms))

/**
 * Runs `work` in one transaction. When the server rolls it back for a deadlock, a lock wait or a
 * lost certification and the unit is idempotent, it is run again after a short random pause
 * (so two conflicting requests do not collide again in step), up to `attempts` times. This is
 * the one place that retries; a unit that is not idempotent gets the error on the first loss.
 */
export async function unitOfWork<T>(sequelize: Sequelize, opts: UnitOfWorkOptions, work: (t: Transaction) => Promise<T>): Promise<T> {
  const attempts = opts.idempotent ? Math.max(1, opts.attempts ?? DEFAULT_ATTEMPTS) : 1
  for (let attempt = 1; ; attempt += 1) {
    try {
      return await sequelize.transaction((t) => work(t))
    } catch (err) {
      if (attempt >= attempts || !isRetryableConflict(err)) throw err
      await pause(BASE_DELAY_MS * 2 ** (attempt - 1) * (0.5 + Math.random()))
    }
  }
}
