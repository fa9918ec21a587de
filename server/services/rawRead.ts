import type { Connection } from 'mariadb'
import type { Sequelize } from 'sequelize'

/**
 * What Sequelize calls its `logging` option with: the statement, then the query's options. Sequelize's
 * typings say the second argument is a time in ms, which it is only with `benchmark`; the bench's
 * statement counter (scripts/bench/worklist.ts) reads `rawValues` from it.
 */
type StatementLog = (sql: string, options?: { rawValues?: Record<string, unknown> }) => void

/** Sequelize keeps its constructor options as a public property at run time; its typings omit it. */
type SequelizeWithOptions = Sequelize & { readonly options: { logging?: boolean | StatementLog } }

/**
 * A Date as the UTC text MariaDB reads. The driver writes a Date in the process's local time while
 * the connections run in UTC (db.ts), so a server outside UTC would shift every time it sends.
 */
export function utcParam<T>(v: T): T | string {
  return v instanceof Date ? v.toISOString().slice(0, 23).replace('T', ' ') : v
}

/**
 * A SELECT sent straight through the mariadb driver on a connection of Sequelize's own pool, for
 * the reads made on every request (the worklist, the session lookup). Sequelize's query path
 * (tokenising the SQL for :name replacements, escaping, result handling) was about a seventh of
 * a worklist request's server CPU; the driver does the same substitution in its own parser.
 * The connection keeps Sequelize's settings (UTC, type casts), so rows come back as they did.
 * Sequelize's `logging` option still sees each statement, its values as `rawValues`.
 */
export async function rawSelect<T>(sequelize: Sequelize, sql: string, values: Record<string, unknown> = {}): Promise<T[]> {
  const log = (sequelize as SequelizeWithOptions).options.logging
  if (typeof log === 'function') log(sql, { rawValues: values })
  const manager = sequelize.connectionManager
  // The mariadb dialect's pool lends the driver's own (promise) connections; Sequelize types them as `object`.
  const conn = (await manager.getConnection({ type: 'read' })) as Connection
  try {
    // The driver's rows array carries a non-enumerable `meta`; callers get a plain array.
    const params = Object.fromEntries(Object.entries(values).map(([k, v]) => [k, utcParam(v)]))
    return Array.from(await conn.query<T[]>({ sql, namedPlaceholders: true }, params))
  } finally {
    // Typed `void`, but Sequelize's implementation is async: wait for the pool to take it back, as before.
    await manager.releaseConnection(conn)
  }
}
