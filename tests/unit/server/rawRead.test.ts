import { describe, expect, it } from 'vitest'
import { bindNamed, isoFromUtcText } from '../../../server/services/rawRead'

describe('named placeholders bound for a prepared statement', () => {
  it('when a statement names values, then each becomes ? in order, a repeated name twice', () => {
    expect(bindNamed('SELECT 1 FROM t WHERE a = :a AND b > :b OR a2 = :a', { a: 1, b: 'x' })).toEqual({
      sql: 'SELECT 1 FROM t WHERE a = ? AND b > ? OR a2 = ?',
      params: [1, 'x', 1],
    })
  })

  it('when a value is a list, then it gets one placeholder per item, and a name that only starts alike is left alone', () => {
    expect(bindNamed('WHERE s IN (:stages) AND t = :stagesAt', { stages: ['referred', 'screened'], stagesAt: 3 })).toEqual({
      sql: 'WHERE s IN (?, ?) AND t = ?',
      params: ['referred', 'screened', 3],
    })
  })

  it("when a colon is inside a quoted literal, then it is not a placeholder (DATE_FORMAT's pattern)", () => {
    const sql = "SELECT DATE_FORMAT(a.starts_at, '%Y-%m-%dT%H:%i:%s.000Z'), 'it''s :not' FROM a WHERE a.starts_at >= :now"
    const bound = bindNamed(sql, { now: new Date(Date.UTC(2026, 0, 5, 9, 30, 0, 250)) })
    expect(bound.sql).toBe("SELECT DATE_FORMAT(a.starts_at, '%Y-%m-%dT%H:%i:%s.000Z'), 'it''s :not' FROM a WHERE a.starts_at >= ?")
    // Dates are sent as the UTC text the connections read (they run in UTC).
    expect(bound.params).toEqual(['2026-01-05 09:30:00.250'])
  })

  it('when a named value is missing, then it is refused rather than sent as NULL', () => {
    expect(() => bindNamed('WHERE a = :a AND b = :b', { a: 1 })).toThrow(/no value for :b/)
  })
})

describe('DATETIME text as the API instant', () => {
  it('when the text is whole seconds, then it is the ISO instant Date#toISOString gives', () => {
    expect(isoFromUtcText('2026-01-05 09:00:07')).toBe(new Date(Date.UTC(2026, 0, 5, 9, 0, 7)).toISOString())
    expect(isoFromUtcText(null)).toBeNull()
  })

  it('when the text has a fraction, then it is read as UTC too', () => {
    expect(isoFromUtcText('2026-01-05 23:59:59.5')).toBe('2026-01-05T23:59:59.500Z')
  })
})
