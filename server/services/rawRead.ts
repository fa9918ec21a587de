import type { Sequelize } from 'sequelize'
import { logRawStatement, withDriverConnection } from './rawDriver'

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
  logRawStatement(sequelize, sql, values)
  return withDriverConnection(sequelize, { type: 'read' }, async (conn) => {
    // The driver's rows array carries a non-enumerable `meta`; callers get a plain array.
    const params = Object.fromEntries(Object.entries(values).map(([k, v]) => [k, utcParam(v)]))
    return Array.from(await conn.query<T[]>({ sql, namedPlaceholders: true }, params))
  })
}
