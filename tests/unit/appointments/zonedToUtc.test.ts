import { describe, expect, it } from 'vitest'
import { zonedPartsToUtcMs, zonedToUtc, zoneOffsetMs } from '../../../shared/appointments/time'

// zonedToUtc takes the zone's offset from a per-UTC-day cache; the reference asks Intl (zoneOffsetMs) at
// every step, the two-pass rule as it was before the cache. Zones as in dateInZone.test.ts (IANA names,
// common practice): a half-hour summer shift, quarter-hour offsets, Apia's skipped day, one-hour changes.
const ZONES = [
  'Europe/London',
  'America/New_York',
  'Australia/Lord_Howe',
  'Asia/Kathmandu',
  'Pacific/Chatham',
  'Pacific/Apia',
  'America/St_Johns',
  'UTC',
]
const DAY = 86_400_000

function reference(wall: number, zone: string): number {
  const guess = wall - zoneOffsetMs(new Date(wall), zone)
  return wall - zoneOffsetMs(new Date(guess), zone)
}

function parts(wall: number): [number, number, number, number, number] {
  const d = new Date(wall)
  return [d.getUTCFullYear(), d.getUTCMonth() + 1, d.getUTCDate(), d.getUTCHours(), d.getUTCMinutes()]
}

describe("a wall-clock time on the clinic's clocks as an instant", () => {
  it('when wall-clock times step every 3 h 7 min through 2011–2012 and 2026–2027, then every zone agrees with Intl', () => {
    for (const zone of ZONES)
      for (const [from, to] of [
        [Date.UTC(2011, 0, 1), Date.UTC(2012, 11, 31)],
        [Date.UTC(2026, 0, 1), Date.UTC(2027, 11, 31)],
      ])
        for (let wall = from!; wall < to!; wall += 187 * 60_000)
          expect(zonedPartsToUtcMs(...parts(wall), zone), `${zone} ${new Date(wall).toISOString()}`).toBe(reference(wall, zone))
  })

  it('when a day has a clock change, then every 5 minutes of the wall clock around it agree with Intl (gaps and repeats too)', () => {
    for (const zone of ZONES)
      for (let day = Date.UTC(2011, 0, 1) / DAY; day < Date.UTC(2027, 11, 31) / DAY; day++) {
        if (day === Date.UTC(2013, 0, 1) / DAY) day = Date.UTC(2026, 0, 1) / DAY
        if (zoneOffsetMs(new Date(day * DAY), zone) === zoneOffsetMs(new Date((day + 1) * DAY - 1000), zone)) continue
        for (let wall = (day - 2) * DAY; wall < (day + 3) * DAY; wall += 300_000)
          expect(zonedPartsToUtcMs(...parts(wall), zone), `${zone} ${new Date(wall).toISOString()}`).toBe(reference(wall, zone))
      }
  })

  it('when the clinic is in London, then 09:30 in winter and in summer are the instants GOV.UK time gives', () => {
    // GMT in January, BST (UTC+1) in July: GOV.UK "When do the clocks change".
    expect(zonedToUtc('2026-01-15', '09:30', 'Europe/London').toISOString()).toBe('2026-01-15T09:30:00.000Z')
    expect(zonedToUtc('2026-07-15', '09:30', 'Europe/London').toISOString()).toBe('2026-07-15T08:30:00.000Z')
  })

  it('when a time is far outside the clinic years, then it is still converted through Intl', () => {
    const wall = Date.UTC(1850, 5, 1, 12, 0)
    expect(zonedPartsToUtcMs(1850, 6, 1, 12, 0, 'Europe/London')).toBe(reference(wall, 'Europe/London'))
  })
})
