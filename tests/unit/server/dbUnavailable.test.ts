import { describe, expect, it } from 'vitest'
import { ConnectionAcquireTimeoutError, ConnectionError, ConnectionRefusedError, DatabaseError, UniqueConstraintError } from 'sequelize'
import { isDatabaseUnavailable } from '../../../server/dbUnavailable'

/** The shape of the mariadb driver's SqlError: a code, an errno, and the SQL it was running. */
function sqlError(code: string, errno: number, message = code): Error & { code: string; errno: number; sql: string } {
  return Object.assign(new Error(message), { code, errno, sql: 'SELECT 1' })
}

describe('which errors mean the database cannot be reached', () => {
  it('when Sequelize could not connect (refused, no socket, pool acquire timeout), then it is an outage', () => {
    expect(isDatabaseUnavailable(new ConnectionRefusedError(sqlError('ECONNREFUSED', -111)))).toBe(true)
    expect(isDatabaseUnavailable(new ConnectionError(sqlError('ENOENT', -2)))).toBe(true)
    expect(isDatabaseUnavailable(new ConnectionAcquireTimeoutError(new Error('ResourceRequest timed out')))).toBe(true)
  })

  it('when a query dies with its socket (the server was killed mid-query), then it is an outage', () => {
    const err = new DatabaseError(sqlError('ER_SOCKET_UNEXPECTED_CLOSE', 45009, 'socket has unexpectedly been closed') as never)
    expect(isDatabaseUnavailable(err)).toBe(true)
    expect(isDatabaseUnavailable(new DatabaseError(sqlError('ECONNRESET', -104, 'read ECONNRESET') as never))).toBe(true)
    expect(isDatabaseUnavailable(sqlError('ER_GET_CONNECTION_TIMEOUT', 45028))).toBe(true)
  })

  it('when the server is shutting down (ER_SERVER_SHUTDOWN, 1053), then it is an outage', () => {
    expect(isDatabaseUnavailable(new DatabaseError(sqlError('ER_SERVER_SHUTDOWN', 1053) as never))).toBe(true)
  })

  it('when the database answered and refused the query, then it is not an outage', () => {
    expect(isDatabaseUnavailable(new DatabaseError(sqlError('ER_PARSE_ERROR', 1064) as never))).toBe(false)
    expect(isDatabaseUnavailable(new UniqueConstraintError({ parent: sqlError('ER_DUP_ENTRY', 1062) as never }))).toBe(false)
    expect(isDatabaseUnavailable(new TypeError('field.resolve is not a function'))).toBe(false)
    expect(isDatabaseUnavailable(null)).toBe(false)
  })
})
