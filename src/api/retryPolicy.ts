import { isApiError } from './client'

/**
 * When the client asks again by itself. Pure, so the decision is tested on its own
 * (tests/unit/api/retryPolicy.test.ts). TanStack Query passes `failureCount` as the number of
 * failures before this one (0 on the first).
 */

/** The server is up but its database is not (issue #12): it answers 503 `unavailable`. */
export function isDatabaseUnavailable(error: unknown): boolean {
  return isApiError(error, 'unavailable') && error.status === 503
}

/** Failures that pass by themselves: no connection, or a gateway or database that is down for now. */
export function isTransient(error: unknown): boolean {
  return isApiError(error) && (error.status === 0 || error.status === 502 || error.status === 503 || error.status === 504)
}

/**
 * An outage (MariaDB restarting) lasts seconds: six tries over about half a minute ride it out.
 * Any other server error is tried twice more; a 4xx will not change on a retry.
 */
export const TRANSIENT_READ_RETRIES = 6
export const OTHER_READ_RETRIES = 2
export const MAX_RETRY_DELAY_MS = 30_000

export function shouldRetryRead(failureCount: number, error: unknown): boolean {
  if (isApiError(error) && error.status >= 400 && error.status < 500) return false
  return failureCount < (isTransient(error) ? TRANSIENT_READ_RETRIES : OTHER_READ_RETRIES)
}

/** The server's Retry-After when it gave one (kept between 0.5 s and 30 s), else 1 s, 2 s, 4 s … up to 30 s. */
export function retryDelayMs(failureCount: number, error: unknown): number {
  const asked = isApiError(error) ? error.retryAfterMs : undefined
  if (asked !== undefined) return Math.min(Math.max(asked, 500), MAX_RETRY_DELAY_MS)
  return Math.min(1000 * 2 ** failureCount, MAX_RETRY_DELAY_MS)
}
