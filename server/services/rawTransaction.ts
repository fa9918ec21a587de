import type { Sequelize, Transaction } from 'sequelize'
import { utcParam } from './rawRead'

/** A value the bulk statements send: numbers and strings as they are, dates as UTC. */
export type RawValue = string | number | Date | null

interface DriverConnection {
  query<T>(sql: string, values: readonly unknown[]): Promise<T>
}
interface Pool {
  getConnection(o: { type: 'read' | 'write' }): Promise<DriverConnection>
  releaseConnection(c: DriverConnection): Promise<void>
}
type FormatError = (err: unknown, stack?: string) => Error
type QueryClass = new (conn: unknown, sequelize: Sequelize, opts: object) => { formatError: FormatError }

/**
 * A bulk statement with `?` placeholders sent straight through the mariadb driver on the
 * transaction's own connection (as rawRead.ts does for reads), for the statements an import or
 * reversal sends a thousand rows at a time: Sequelize's path escaped every value itself (dates
 * through moment), the largest share of a 100 000-row import's server CPU. Same transaction, same
 * errors: a driver error goes through the dialect's own formatError (a duplicate key is still a
 * UniqueConstraintError, a lost database a DatabaseError whose parent isDatabaseUnavailable
 * recognises, so a 503), and a deadlock marks the transaction rolled back as Sequelize does.
 * Sequelize's `logging` option still sees each statement, its values as `rawValues`.
 */
export async function rawInTransaction<T = unknown>(
  sequelize: Sequelize,
  t: Transaction | undefined,
  sql: string,
  values: readonly RawValue[],
): Promise<T> {
  // Sequelize's typings omit `options`, `connectionManager`, `dialect.Query` and `connection`; all are public at run time.
  const seq = sequelize as unknown as {
    options: { logging?: unknown }
    connectionManager: Pool
    dialect: { Query: QueryClass }
  }
  const log = seq.options.logging
  if (typeof log === 'function') (log as (sql: string, o: { rawValues: unknown }) => void)(sql, { rawValues: values })
  const params = values.map(utcParam)
  const own = t ? null : await seq.connectionManager.getConnection({ type: 'write' })
  const conn = own ?? (t as unknown as { connection: DriverConnection }).connection
  const stack = new Error().stack
  try {
    return await conn.query<T>(sql, params)
  } catch (err) {
    if (t && (err as { errno?: unknown }).errno === 1213) {
      // ER_LOCK_DEADLOCK: the server has rolled the transaction back already (Sequelize's mariadb query does the same).
      await t.rollback().catch(() => undefined)
      ;(t as unknown as { finished: string }).finished = 'rollback'
    }
    throw new seq.dialect.Query(conn, sequelize, {}).formatError(err, stack)
  } finally {
    if (own) await seq.connectionManager.releaseConnection(own)
  }
}
