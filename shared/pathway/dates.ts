/**
 * Calendar-date helpers on 'YYYY-MM-DD' strings. Surgery and due dates are whole days in the
 * hospital's local calendar, so they are never turned into instants (which would shift a day
 * across time zones).
 */
import { localDate, steadyOffsetOnUtcDay } from '../appointments/time'

const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/

export function isIsoDate(value: unknown): value is string {
  if (typeof value !== 'string') return false
  const m = ISO_DATE.exec(value)
  if (!m) return false
  const d = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])))
  return d.getUTCFullYear() === Number(m[1]) && d.getUTCMonth() === Number(m[2]) - 1 && d.getUTCDate() === Number(m[3])
}

/**
 * The clinic's "today": the calendar date on the clinic's clocks (CLINIC_TIME_ZONE), whatever
 * zone the server or browser runs in. Every clinical rule that counts days (flags, the
 * projection, the screening window, the age of a result, reminders) starts from this one, so
 * a flag cannot move by a day around midnight depending on which clock answered.
 */
export function todayInZone(timeZone: string, now: Date = new Date()): string {
  return localDate(now, timeZone)
}

const DAY_MS = 86_400_000

/**
 * The clinic's calendar date of an instant (a sample's time taken, a dose given). Intl's
 * formatToParts costs about 40 µs a call, and re-screening an import's 20 000 episodes reads
 * every Hb's clinic day (2.3 s of server CPU): so the zone's offset is looked up once per UTC day
 * (steadyOffsetOnUtcDay: its first and last second) and, on a day when it does not change, the
 * date is the UTC date of the shifted instant. A day with a clock change, or a time outside
 * 1900–2199, asks Intl.
 */
export function dateInZone(instant: Date | string, timeZone: string): string {
  const at = typeof instant === 'string' ? new Date(instant) : instant
  const ms = at.getTime()
  if (!(ms >= -2_208_988_800_000 && ms < 7_258_118_400_000)) return localDate(at, timeZone)
  const offset = steadyOffsetOnUtcDay(Math.floor(ms / DAY_MS), timeZone)
  return offset === null ? localDate(at, timeZone) : new Date(ms + offset).toISOString().slice(0, 10)
}

/**
 * Today in the local calendar of whoever runs this: only for form defaults in the browser,
 * where the user's own calendar is what they expect. Clinical rules use todayInZone.
 */
export function todayIso(now: Date = new Date()): string {
  const pad = (n: number) => String(n).padStart(2, '0')
  return `${now.getFullYear()}-${pad(now.getMonth() + 1)}-${pad(now.getDate())}`
}

function utcDay(iso: string): number {
  // 'YYYY-MM-DD' read by position (a worklist page reads three dates a row); anything else by splitting.
  if (iso.length === 10 && iso.charCodeAt(4) === 45 && iso.charCodeAt(7) === 45) {
    return Date.UTC(Number(iso.slice(0, 4)), Number(iso.slice(5, 7)) - 1, Number(iso.slice(8, 10))) / 86_400_000
  }
  const [y, m, d] = iso.split('-').map(Number)
  return Date.UTC(y!, m! - 1, d!) / 86_400_000
}

export function addDays(iso: string, days: number): string {
  const d = new Date((utcDay(iso) + days) * 86_400_000)
  return d.toISOString().slice(0, 10)
}

/** Whole days from `from` to `to` (negative when `to` is earlier). */
export function daysBetween(from: string, to: string): number {
  return utcDay(to) - utcDay(from)
}

/** Age in completed years on a given day. */
export function ageOn(dateOfBirth: string, onIso: string): number {
  const [by, bm, bd] = dateOfBirth.split('-').map(Number)
  const [y, m, d] = onIso.split('-').map(Number)
  return y! - by! - (m! < bm! || (m === bm && d! < bd!) ? 1 : 0)
}
