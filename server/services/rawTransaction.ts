import type { Sequelize, Transaction } from 'sequelize'
import { driverError, logRawStatement, withDriverConnection } from './rawDriver'
import { utcParam } from './rawRead'

/** A value the bulk statements send: numbers and strings as they are, dates as UTC. */
export type RawValue = string | number | Date | null
/** A value rawInTransaction sends: a RawValue, or a list of numbers for `IN (?)` (the driver writes `1,2,3`). */
export type RawParam = RawValue | readonly number[]

/**
 * A bulk statement with `?` placeholders sent straight through the mariadb driver on the
 * transaction's own connection (as rawRead.ts does for reads), for the statements an import or
 * reversal sends a thousand rows at a time: Sequelize's path escaped every value itself (dates
 * through moment), the largest share of a 100 000-row import's server CPU. Same transaction, same
 * errors (rawDriver.ts's driverError: a duplicate key is still a UniqueConstraintError, a lost
 * database a 503, a deadlock rolls the transaction back). Sequelize's `logging` option still sees
 * each statement, its values as `rawValues`.
 */
export async function rawInTransaction<T = unknown>(
  sequelize: Sequelize,
  t: Transaction | undefined,
  sql: string,
  values: readonly RawParam[],
  how: RawHow = {},
): Promise<T> {
  logRawStatement(sequelize, sql, values)
  // A copy only when there is a Date to write as UTC text (an import's chunks send theirs as text already).
  const params = values.some((v) => v instanceof Date) ? values.map(utcParam) : values
  return withDriverConnection(sequelize, { type: 'write', transaction: t }, async (conn) => {
    // The call site's stack, formatted only if the statement fails (formatting it is the dear part).
    const site = new Error()
    try {
      const options = how.plainRows ? { sql, typeCast: undefined } : sql
      return await conn.query<T>(options, params)
    } catch (err) {
      throw await driverError(sequelize, conn, t, err, site.stack)
    }
  })
}

/**
 * How rawInTransaction sends a statement. `plainRows`: rows come back without the connection's type cast
 * (Sequelize's, which only turns DATE and DATETIME into other types but wraps every value it reads), for
 * a read that returns no DATE or DATETIME column. (Sending the import's chunk statements as server-side
 * prepared statements was measured and cost more server CPU, not less: README, performance notes.)
 */
export interface RawHow {
  plainRows?: boolean
}

/**
 * One INSERT with one row of `?` placeholders, sent for many rows through the driver's `batch()`
 * (MariaDB's binary bulk protocol: the statement is prepared once and the rows go as binary values),
 * on the transaction's own connection. For an import's result rows: the text multi-row INSERT cost
 * the server about 0.9 s of CPU per 100 000 rows in building and MariaDB's parsing of the text. Same
 * transaction, same error mapping and dates as UTC text, as rawInTransaction.
 */
export async function rawBatchInTransaction(
  sequelize: Sequelize,
  t: Transaction | undefined,
  sql: string,
  rows: readonly (readonly RawValue[])[],
): Promise<void> {
  if (!rows.length) return
  logRawStatement(sequelize, sql, rows)
  // A row without a Date (an import's rows carry their times as UTC text already) is sent as it is.
  const params = rows.map((r) => (r.some((v) => v instanceof Date) ? r.map(utcParam) : r))
  await withDriverConnection(sequelize, { type: 'write', transaction: t }, async (conn) => {
    const site = new Error()
    try {
      await conn.batch(sql, params as RawValue[][])
    } catch (err) {
      throw await driverError(sequelize, conn, t, err, site.stack)
    }
  })
}
