import { describe, expect, it } from 'vitest'
import { ApiError } from '../../../src/api/client'
import { parseRetryAfter } from '../../../src/api/retryAfter'
import {
  isDatabaseUnavailable,
  MAX_RETRY_DELAY_MS,
  retryDelayMs,
  shouldRetryRead,
  TRANSIENT_READ_RETRIES,
} from '../../../src/api/retryPolicy'

const unavailable = (retryAfterMs?: number) => new ApiError(503, 'unavailable', 'The database is not reachable', {}, {}, retryAfterMs)
const offline = new ApiError(0, 'network_error', 'Ferrolane cannot reach the server.')

describe('when a read fails, the client decides whether to ask again', () => {
  it('when the database is unavailable (503), then the read is retried up to six times, then given up', () => {
    for (let n = 0; n < TRANSIENT_READ_RETRIES; n++) expect(shouldRetryRead(n, unavailable())).toBe(true)
    expect(shouldRetryRead(TRANSIENT_READ_RETRIES, unavailable())).toBe(false)
  })

  it('when the network is down or a gateway times out, then it is retried like an outage', () => {
    expect(shouldRetryRead(3, offline)).toBe(true)
    expect(shouldRetryRead(3, new ApiError(504, 'http_504', 'Gateway timeout'))).toBe(true)
    expect(shouldRetryRead(3, new ApiError(502, 'http_502', 'Bad gateway'))).toBe(true)
  })

  it('when the server answers 4xx, then it is never retried, not even once', () => {
    for (const [status, code] of [
      [400, 'invalid'],
      [401, 'unauthenticated'],
      [403, 'forbidden'],
      [404, 'not_found'],
      [409, 'conflict'],
      [422, 'rule'],
      [429, 'too_many_requests'],
    ] as const) {
      expect(shouldRetryRead(0, new ApiError(status, code, 'no')), `${status}`).toBe(false)
    }
  })

  it('when the server fails otherwise (500), then it is retried twice only', () => {
    const broken = new ApiError(500, 'internal', 'Something went wrong')
    expect([0, 1, 2].map((n) => shouldRetryRead(n, broken))).toEqual([true, true, false])
  })
})

describe('how long the client waits before asking again', () => {
  it('when the server gave no Retry-After, then the wait doubles from 1 s and stops at 30 s', () => {
    expect([0, 1, 2, 3, 4, 5, 6].map((n) => retryDelayMs(n, unavailable()))).toEqual([1000, 2000, 4000, 8000, 16_000, 30_000, 30_000])
    expect(retryDelayMs(2, offline)).toBe(4000)
  })

  it('when the server asks for Retry-After: 5, then the client waits 5 s, whatever the attempt', () => {
    expect(retryDelayMs(0, unavailable(5000))).toBe(5000)
    expect(retryDelayMs(4, unavailable(5000))).toBe(5000)
  })

  it('when Retry-After is 0 or absurdly long, then the wait is kept between 0.5 s and 30 s', () => {
    expect(retryDelayMs(0, unavailable(0))).toBe(500)
    expect(retryDelayMs(0, unavailable(3_600_000))).toBe(MAX_RETRY_DELAY_MS)
  })
})

describe('reading the Retry-After header (RFC 9110 §10.2.3: seconds or an HTTP date)', () => {
  it('when it is a number of seconds, then it is that many milliseconds', () => {
    expect(parseRetryAfter('5')).toBe(5000)
    expect(parseRetryAfter(' 0 ')).toBe(0)
  })

  it('when it is an HTTP date, then it is the time until that date, never negative', () => {
    const now = Date.parse('Fri, 04 Dec 2026 12:00:00 GMT')
    expect(parseRetryAfter('Fri, 04 Dec 2026 12:00:07 GMT', now)).toBe(7000)
    expect(parseRetryAfter('Fri, 04 Dec 2026 11:59:00 GMT', now)).toBe(0)
  })

  it('when it is absent or unreadable, then there is none', () => {
    expect(parseRetryAfter(null)).toBeUndefined()
    expect(parseRetryAfter('')).toBeUndefined()
    expect(parseRetryAfter('soon')).toBeUndefined()
    expect(parseRetryAfter('-3')).toBeUndefined()
  })
})

describe('which failed change means the database is down', () => {
  it('when the server answers 503 unavailable, then yes; another 503 or a 500, then no', () => {
    expect(isDatabaseUnavailable(unavailable())).toBe(true)
    expect(isDatabaseUnavailable(new ApiError(503, 'http_503', 'Service unavailable'))).toBe(false)
    expect(isDatabaseUnavailable(new ApiError(500, 'internal', 'Something went wrong'))).toBe(false)
    expect(isDatabaseUnavailable(offline)).toBe(false)
  })
})
