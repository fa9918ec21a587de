import type { Connection } from 'mariadb'
import type { Sequelize, Transaction } from 'sequelize'

/**
 * What Sequelize calls its `logging` option with: the statement, then the query's options. Sequelize's
 * typings say the second argument is a time in ms, which it is only with `benchmark`; the bench's
 * statement counter (scripts/bench/worklist.ts) reads `rawValues` from it.
 */
type StatementLog = (sql: string, options?: { rawValues?: unknown }) => void

type FormatError = (err: unknown, stack?: string) => Error
type DialectQuery = new (connection: Connection, sequelize: Sequelize, options: object) => { formatError: FormatError }

/**
 * The parts of Sequelize (6, mariadb dialect) the driver path uses that are public at run time but
 * left out of its typings: the constructor options, the dialect's Query class (its formatError maps a
 * driver error to Sequelize's error family), and a transaction's own connection and state.
 */
type SequelizeRuntime = Sequelize & {
  readonly options: { logging?: boolean | StatementLog }
  readonly dialect: { readonly Query: DialectQuery }
}
type TransactionRuntime = Transaction & { readonly connection: object; finished?: string }

/** Hands a statement to Sequelize's `logging` option, its values as `rawValues`, as Sequelize's own path would. */
export function logRawStatement(sequelize: Sequelize, sql: string, rawValues: unknown): void {
  const log = (sequelize as SequelizeRuntime).options.logging
  if (typeof log === 'function') log(sql, { rawValues })
}

/**
 * Runs `work` on a mariadb driver connection: the transaction's own when one is given (so the
 * statement is part of it), otherwise one lent by Sequelize's pool and given back afterwards. The
 * pool's connections keep Sequelize's settings (UTC, type casts), so rows come back as they do there.
 */
export async function withDriverConnection<T>(
  sequelize: Sequelize,
  use: { type: 'read' | 'write'; transaction?: Transaction },
  work: (conn: Connection) => Promise<T>,
): Promise<T> {
  // The mariadb dialect stores and lends the driver's own (promise) connections; Sequelize types them as `object`.
  if (use.transaction) return work((use.transaction as TransactionRuntime).connection as Connection)
  const manager = sequelize.connectionManager
  const conn = (await manager.getConnection({ type: use.type })) as Connection
  try {
    return await work(conn)
  } finally {
    // Typed `void`, but Sequelize's implementation is async: wait for the pool to take the connection back.
    await manager.releaseConnection(conn)
  }
}

/**
 * A driver error as Sequelize's own path would throw it, through the dialect's formatError: a duplicate
 * key is a UniqueConstraintError, a lost database a DatabaseError that isDatabaseUnavailable recognises
 * (so a 503). On a deadlock the server has already rolled the transaction back; it is marked so, as
 * Sequelize's mariadb query does, so that nothing tries to commit it.
 */
export async function driverError(
  sequelize: Sequelize,
  conn: Connection,
  t: Transaction | undefined,
  err: unknown,
  stack: string | undefined,
): Promise<Error> {
  if (t && (err as { errno?: unknown }).errno === 1213) {
    await t.rollback().catch(() => undefined)
    ;(t as TransactionRuntime).finished = 'rollback'
  }
  return new (sequelize as SequelizeRuntime).dialect.Query(conn, sequelize, {}).formatError(err, stack)
}
