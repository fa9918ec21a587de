import { describe, expect, it } from 'vitest'
import { dateInZone } from '../../../shared/pathway'
import { localDate, zoneOffsetMs } from '../../../shared/appointments/time'

// dateInZone looks a zone's offset up once per UTC day; Intl's answer (localDate) is the reference.
// Zones with a half-hour summer shift (Lord Howe), quarter-hour offsets (Kathmandu, Chatham), a
// date-line move (Apia skipped 30 December 2011) and the usual one-hour changes: common practice,
// IANA tz database zone names.
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

describe("an instant's date on the clinic's calendar", () => {
  it('when instants step every 2 h 13 min 7 s through 2011–2012 and 2026–2027, then every zone agrees with Intl', () => {
    const spans = [
      [Date.UTC(2011, 0, 1), Date.UTC(2012, 11, 31)],
      [Date.UTC(2026, 0, 1), Date.UTC(2027, 11, 31)],
    ]
    for (const zone of ZONES)
      for (const [from, to] of spans)
        for (let ms = from!; ms < to!; ms += 7_987_000) {
          const at = new Date(ms)
          expect(dateInZone(at, zone), `${zone} ${at.toISOString()}`).toBe(localDate(at, zone))
        }
  })

  it('when a day has a clock change, then every 5 minutes of it and of the days either side agree with Intl', () => {
    const DAY = 86_400_000
    for (const zone of ZONES)
      for (let day = Date.UTC(2011, 0, 1) / DAY; day < Date.UTC(2027, 11, 31) / DAY; day++) {
        if (day === Date.UTC(2013, 0, 1) / DAY) day = Date.UTC(2026, 0, 1) / DAY
        if (zoneOffsetMs(new Date(day * DAY), zone) === zoneOffsetMs(new Date((day + 1) * DAY - 1000), zone)) continue
        for (let ms = (day - 1) * DAY; ms < (day + 2) * DAY; ms += 300_000) {
          const at = new Date(ms)
          expect(dateInZone(at, zone), `${zone} ${at.toISOString()}`).toBe(localDate(at, zone))
        }
      }
  })

  it('when the clocks change in London, then the minutes either side of each change are on the right day', () => {
    // 29 March 2026 01:00 UTC: BST begins; 25 October 2026 01:00 UTC: it ends (GOV.UK "When do the clocks change").
    for (const iso of ['2026-03-29T00:59:59Z', '2026-03-29T01:00:00Z', '2026-10-24T23:00:00Z', '2026-10-24T22:59:59Z'])
      expect(dateInZone(iso, 'Europe/London')).toBe(localDate(new Date(iso), 'Europe/London'))
    expect(dateInZone('2026-10-24T23:30:00Z', 'Europe/London')).toBe('2026-10-25')
    expect(dateInZone('2026-10-24T22:30:00Z', 'Europe/London')).toBe('2026-10-24')
  })

  it("when a time is far outside the clinic years, then it still gets Intl's date", () => {
    expect(dateInZone('1850-06-01T12:00:00Z', 'Europe/London')).toBe(localDate(new Date('1850-06-01T12:00:00Z'), 'Europe/London'))
  })
})
