import { zonedPartsToUtcMs } from '../appointments/time'
import type { DateOrder } from './mapping'

const ISO_OFFSET = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.\d+)?)?(Z|[+-]\d{2}:?\d{2})$/
const ISO_LOCAL = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2}))?$/
const DMY_LOCAL = /^(\d{1,2})[/.](\d{1,2})[/.](\d{4})[ T](\d{1,2}):(\d{2})(?::(\d{2}))?$/

function validParts(y: number, m: number, d: number, h: number, min: number, s: number): boolean {
  const probe = new Date(Date.UTC(y, m - 1, d, h, min, s))
  return probe.getUTCFullYear() === y && probe.getUTCMonth() === m - 1 && probe.getUTCDate() === d && h < 24 && min < 60 && s < 60
}

function local(y: number, m: number, d: number, h: number, min: number, s: number, timeZone: string): Date | null {
  if (!validParts(y, m, d, h, min, s)) return null
  return new Date(zonedPartsToUtcMs(y, m, d, h, min, timeZone) + s * 1000)
}

// A regular expression's groups as numbers, a missing one (no seconds) as 0; read by position, not through slice and map.
const num = (m: RegExpExecArray, i: number) => Number(m[i] ?? 0)

/**
 * The instant a sample was taken, from a laboratory's text: ISO 8601 with an offset, or a
 * wall-clock time in the clinic's zone (ISO, or day/month/year when the source says so).
 * A date without a time is refused: results of one sample are matched by their draw time.
 */
export function parseTakenAt(text: string, order: DateOrder, timeZone: string): Date | null {
  const v = text.trim()
  let m = ISO_OFFSET.exec(v)
  if (m) {
    if (!validParts(num(m, 1), num(m, 2), num(m, 3), num(m, 4), num(m, 5), num(m, 6))) return null
    const at = new Date(v.replace(' ', 'T'))
    return Number.isNaN(at.getTime()) ? null : at
  }
  m = ISO_LOCAL.exec(v)
  if (m) {
    return local(num(m, 1), num(m, 2), num(m, 3), num(m, 4), num(m, 5), num(m, 6), timeZone)
  }
  if (order === 'dmy') {
    m = DMY_LOCAL.exec(v)
    if (m) {
      return local(num(m, 3), num(m, 2), num(m, 1), num(m, 4), num(m, 5), num(m, 6), timeZone)
    }
  }
  return null
}

export function expectedDateForm(order: DateOrder): string {
  return order === 'dmy'
    ? 'a date and time such as 31/01/2026 09:30 or 2026-01-31T09:30:00Z'
    : 'an ISO 8601 date and time such as 2026-01-31T09:30:00Z or 2026-01-31 09:30'
}
