import type { Sequelize } from 'sequelize'

interface DriverConnection {
  query<T>(q: { sql: string; namedPlaceholders: true }, values: Record<string, unknown>): Promise<T[]>
}
interface Pool {
  getConnection(o: { type: 'read' | 'write' }): Promise<DriverConnection>
  releaseConnection(c: DriverConnection): Promise<void>
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
  // Sequelize's typings omit `options`; it is a public property at run time.
  const log = (sequelize as unknown as { options: { logging?: unknown } }).options.logging
  if (typeof log === 'function') (log as (sql: string, o: { rawValues: unknown }) => void)(sql, { rawValues: values })
  const pool = (sequelize as unknown as { connectionManager: Pool }).connectionManager
  const conn = await pool.getConnection({ type: 'read' })
  try {
    // The driver's rows array carries a non-enumerable `meta`; callers get a plain array.
    return Array.from(await conn.query<T>({ sql, namedPlaceholders: true }, values))
  } finally {
    await pool.releaseConnection(conn)
  }
}
