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
 * The driver's options for these reads. Sequelize's connections carry its type cast, which the
 * driver calls for every value through a wrapper it builds per value (a dozen closures each: about
 * 9 000 for a worklist page); without it the driver's own readers are used. DATE and DATETIME
 * then come back as the stored text ('2026-01-05', '2026-01-05 09:00:00', UTC: db.ts) instead
 * of a string and a Date; every other type comes back as before (Sequelize casts only those two
 * and GEOMETRY).
 */
const READ_OPTIONS = { typeCast: undefined, dateStrings: true }

/** A statement's `:name` placeholders as `?` and the names in order, per statement text (the texts are the services' own, few). */
const positional = new Map<string, { sql: string; names: string[] }>()

/** Quoted literals are skipped, so a `:` inside one (a DATE_FORMAT pattern) is left alone. */
const PLACEHOLDER = /'(?:[^'\\]|\\.)*'|:(\w+)/g

function toPositional(named: string): { sql: string; names: string[] } {
  let hit = positional.get(named)
  if (!hit) {
    const names: string[] = []
    const sql = named.replace(PLACEHOLDER, (whole, name: string | undefined) => (name ? (names.push(name), '?') : whole))
    if (positional.size >= 1000) positional.clear()
    positional.set(named, (hit = { sql, names }))
  }
  return hit
}

/**
 * The statement with positional `?` and its values in order. A list value (`IN (:ids)`) becomes one
 * placeholder per item, as the binary protocol sends one value per placeholder. The driver's own
 * `namedPlaceholders` is not used for prepared statements: mariadb 3.5 files the prepared statement
 * under the rewritten text but looks it up under the named one, so it would prepare (and close)
 * the statement on every call.
 */
export function bindNamed(sql: string, values: Record<string, unknown>): { sql: string; params: unknown[] } {
  for (const [name, v] of Object.entries(values)) {
    if (!Array.isArray(v)) continue
    // An empty list matches nothing.
    const items = v.length ? v.map((_, i) => `:${name}__${i}`).join(', ') : 'NULL'
    sql = sql.replace(new RegExp(`:${name}(?!\\w)`, 'g'), items)
  }
  const p = toPositional(sql)
  const params = p.names.map((name) => {
    const list = /^(\w+)__(\d+)$/.exec(name)
    const v = Object.hasOwn(values, name) ? values[name] : list ? (values[list[1]!] as unknown[])[Number(list[2])] : undefined
    if (v === undefined) throw new Error(`rawSelect: no value for :${name}`)
    return utcParam(v)
  })
  return { sql: p.sql, params }
}

/**
 * A SELECT sent straight through the mariadb driver on a connection of Sequelize's own pool, for
 * the reads made on every request (the worklist, the session lookup). Sequelize's query path
 * (tokenising the SQL for :name replacements, escaping, result handling) was about a seventh of
 * a worklist request's server CPU. The statement is a server-side prepared statement (the
 * driver's `execute`, binary protocol): the driver keeps it per connection (`prepareCacheLength`,
 * 256 by default) and sends only its id and the values afterwards, so MariaDB does not parse the
 * text again and nothing is escaped. Rows come back without Sequelize's type cast (READ_OPTIONS):
 * DATE and DATETIME columns are UTC text. Sequelize's `logging` option still sees each statement,
 * its values as `rawValues`.
 */
export async function rawSelect<T>(
  sequelize: Sequelize,
  sql: string,
  values: Record<string, unknown> = {},
  how: { prepared: boolean } = { prepared: true },
): Promise<T[]> {
  logRawStatement(sequelize, sql, values)
  const bound = bindNamed(sql, values)
  return withDriverConnection(sequelize, { type: 'read' }, async (conn) => {
    const options = { ...READ_OPTIONS, sql: bound.sql }
    // The driver's rows array carries a non-enumerable `meta`; callers get a plain array.
    return Array.from(await (how.prepared ? conn.execute<T[]>(options, bound.params) : conn.query<T[]>(options, bound.params)))
  })
}

/** A DATETIME read by rawSelect ('2026-01-05 09:00:00', UTC) as the ISO instant the API sends. */
export function isoFromUtcText(v: string | null): string | null {
  if (v == null) return null
  return v.length === 19 ? `${v.slice(0, 10)}T${v.slice(11)}.000Z` : new Date(`${v.replace(' ', 'T')}Z`).toISOString()
}
