/**
 * A Retry-After header in milliseconds: either whole seconds or an HTTP date (RFC 9110 §10.2.3).
 * Undefined when absent or unreadable. Apart from retryPolicy.ts so that client.ts can use it
 * without the two importing each other.
 */
export function parseRetryAfter(value: string | null | undefined, now: number = Date.now()): number | undefined {
  if (!value) return undefined
  const text = value.trim()
  if (/^\d+$/.test(text)) return Number(text) * 1000
  // Only the IMF-fixdate servers send today ("Fri, 04 Dec 2026 12:00:07 GMT"); Date.parse alone
  // would read "-3" as a year.
  if (!/^[A-Z][a-z]{2}, \d{2} [A-Z][a-z]{2} \d{4} \d{2}:\d{2}:\d{2} GMT$/.test(text)) return undefined
  const at = Date.parse(text)
  return Number.isNaN(at) ? undefined : Math.max(0, at - now)
}
