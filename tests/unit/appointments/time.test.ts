import { describe, expect, it } from 'vitest'
import { localDate, localTime, longDate, zonedToUtc, zoneName } from '../../../shared/appointments'

// UK clock changes: last Sunday of March (01:00 UTC) and of October (01:00 UTC) — common practice, GOV.UK "When do the clocks change".
describe('clinic wall-clock time', () => {
  it('when it is summer in London, then 09:30 on the clinic clock is 08:30 UTC', () => {
    expect(zonedToUtc('2027-07-13', '09:30', 'Europe/London').toISOString()).toBe('2027-07-13T08:30:00.000Z')
  })

  it('when it is winter in London, then clinic time is UTC', () => {
    expect(zonedToUtc('2027-01-12', '09:30', 'Europe/London').toISOString()).toBe('2027-01-12T09:30:00.000Z')
  })

  it('when the clocks went forward that night (28 March 2027), then a morning time is already on summer time', () => {
    expect(zonedToUtc('2027-03-28', '09:00', 'Europe/London').toISOString()).toBe('2027-03-28T08:00:00.000Z')
    expect(zonedToUtc('2027-03-27', '09:00', 'Europe/London').toISOString()).toBe('2027-03-27T09:00:00.000Z')
  })

  it('when an instant is shown, then date and time read in the clinic zone, not the server zone', () => {
    const d = new Date('2027-07-13T23:30:00Z')
    expect(localDate(d, 'Europe/London')).toBe('2027-07-14')
    expect(localTime(d, 'Europe/London')).toBe('00:30')
    expect(longDate(d, 'Europe/London')).toBe('Wednesday 14 July 2027')
  })

  it('then the zone is named in words a patient understands', () => {
    expect(zoneName('Europe/London')).toBe('UK time (Europe/London)')
    expect(zoneName('Europe/Dublin')).toBe('local time (Europe/Dublin)')
  })
})
