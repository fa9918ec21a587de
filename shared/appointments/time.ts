/**
 * Wall-clock helpers for the clinic's time zone. Appointments are stored as instants (UTC);
 * patients read them in the clinic's local time, and staff enter session times that way.
 * Only Intl is used, so the browser and the server agree without a time-zone library.
 */

// Building a formatter costs far more than using one; imports read a zone per row.
const formatters = new Map<string, Intl.DateTimeFormat>()

// The clock's fields change only from one second to the next, and every request asks for "now"
// (the clinic's day, the zone's offset) more than once: the last second asked is remembered per zone.
const lastParts = new Map<string, { second: number; out: Readonly<Record<string, number>> }>()

function parts(instant: Date, timeZone: string): Readonly<Record<string, number>> {
  const second = Math.floor(instant.getTime() / 1000)
  const last = lastParts.get(timeZone)
  if (last && last.second === second) return last.out
  const out = formatParts(instant, timeZone)
  if (lastParts.size > 50) lastParts.clear()
  lastParts.set(timeZone, { second, out })
  return out
}

function formatParts(instant: Date, timeZone: string): Record<string, number> {
  let fmt = formatters.get(timeZone)
  if (!fmt) {
    fmt = new Intl.DateTimeFormat('en-GB', {
      timeZone,
      hourCycle: 'h23',
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
    })
    formatters.set(timeZone, fmt)
  }
  const out: Record<string, number> = {}
  for (const p of fmt.formatToParts(instant)) if (p.type !== 'literal') out[p.type] = Number(p.value)
  return out
}

/** Milliseconds the zone is ahead of UTC at that instant (+3 600 000 for London in summer). */
export function zoneOffsetMs(instant: Date, timeZone: string): number {
  const p = parts(instant, timeZone)
  const asUtc = Date.UTC(p.year!, p.month! - 1, p.day!, p.hour!, p.minute!, p.second!)
  return asUtc - Math.floor(instant.getTime() / 1000) * 1000
}

const DAY_MS = 86_400_000
// The UTC offset of each zone over each UTC day, or null on a day whose offset changes.
const dayOffsets = new Map<string, Map<number, number | null>>()

/**
 * The zone's offset over the whole UTC day `day` (days since 1970), or null when it changes that
 * day. Intl's formatToParts costs about 40 µs a call, so each day is asked about once (its first
 * and last second) instead of once per instant: re-screening reads the clinic day of every Hb, and
 * a laboratory file in wall-clock time converts every row's time (README, performance notes).
 */
export function steadyOffsetOnUtcDay(day: number, timeZone: string): number | null {
  let zone = dayOffsets.get(timeZone)
  if (!zone) dayOffsets.set(timeZone, (zone = new Map()))
  let offset = zone.get(day)
  if (offset === undefined) {
    const first = zoneOffsetMs(new Date(day * DAY_MS), timeZone)
    const last = zoneOffsetMs(new Date((day + 1) * DAY_MS - 1000), timeZone)
    offset = first === last ? first : null
    if (zone.size >= 20_000) zone.clear()
    zone.set(day, offset)
  }
  return offset
}

/** zoneOffsetMs at a whole-minute instant, from the day's steady offset when it has one (1900–2199), else from Intl. */
function offsetAtMinute(ms: number, timeZone: string): number {
  if (ms >= -2_208_988_800_000 && ms < 7_258_118_400_000) {
    const steady = steadyOffsetOnUtcDay(Math.floor(ms / DAY_MS), timeZone)
    if (steady !== null) return steady
  }
  return zoneOffsetMs(new Date(ms), timeZone)
}

/** zonedToUtc from numbers (month 1–12), as a time in ms: an import converts every row's wall-clock time. */
export function zonedPartsToUtcMs(y: number, m: number, d: number, h: number, min: number, timeZone: string): number {
  const wall = Date.UTC(y, m - 1, d, h, min)
  // Two passes settle the offset on either side of a clock change.
  const guess = wall - offsetAtMinute(wall, timeZone)
  return wall - offsetAtMinute(guess, timeZone)
}

/** The instant at which the clinic's clocks show `dateIso` `hhmm` ('2026-03-31', '09:30'). */
export function zonedToUtc(dateIso: string, hhmm: string, timeZone: string): Date {
  const [y, m, d] = dateIso.split('-').map(Number)
  const [h, min] = hhmm.split(':').map(Number)
  return new Date(zonedPartsToUtcMs(y!, m!, d!, h!, min!, timeZone))
}

const pad = (n: number) => String(n).padStart(2, '0')

/** 'YYYY-MM-DD' of the instant on the clinic's calendar. */
export function localDate(instant: Date, timeZone: string): string {
  const p = parts(instant, timeZone)
  return `${p.year}-${pad(p.month!)}-${pad(p.day!)}`
}

/** 'HH:MM' (24-hour) of the instant on the clinic's clocks. */
export function localTime(instant: Date, timeZone: string): string {
  const p = parts(instant, timeZone)
  return `${pad(p.hour!)}:${pad(p.minute!)}`
}

/** 'Tuesday 12 May 2026' in the clinic's calendar. */
export function longDate(instant: Date, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone, weekday: 'long', day: 'numeric', month: 'long', year: 'numeric' })
    .format(instant)
    .replace(',', '')
}

/** 'Tue 12 May' for subject lines. */
export function shortDate(instant: Date, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone, weekday: 'short', day: 'numeric', month: 'short' }).format(instant).replace(',', '')
}

/** 'UK time (Europe/London)': how the e-mail names the zone, so nobody guesses. */
export function zoneName(timeZone: string): string {
  return timeZone === 'Europe/London' ? 'UK time (Europe/London)' : `local time (${timeZone})`
}

/** 'UK time', or the zone's own name: the short form beside times on staff screens. */
export function zoneShortName(timeZone: string): string {
  return timeZone === 'Europe/London' ? 'UK time' : timeZone.replace(/_/g, ' ')
}

export function isTimeZone(value: string): boolean {
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: value })
    return true
  } catch {
    return false
  }
}
