import { describe, expect, it } from 'vitest'
import { recheckDueOn } from '../../../shared/clinic/recheck'

// 28 days: the ferric carboxymaltose product information asks for Hb to be reassessed no
// earlier than 4 weeks after the last dose (clinical reference §6).
describe('the re-check due date on the clinic calendar', () => {
  it(
    'when a dose is given at 00:30 London summer time (23:30 UTC the day before), then the re-check is due 28 days after the London ' +
      'day',
    () => {
      expect(recheckDueOn('2027-07-14T23:30:00Z', 'Europe/London', 28)).toBe('2027-08-12')
      // The UTC day would have been 2027-07-14 → 2027-08-11, a day early.
    },
  )

  it('when a dose is given at 10:00 in Auckland (22:00 UTC the day before), then the Auckland day counts', () => {
    expect(recheckDueOn('2027-03-01T22:00:00Z', 'Pacific/Auckland', 28)).toBe('2027-03-30')
  })

  it('when a dose is given at 23:30 in New York (04:30 UTC the next day), then the New York day counts', () => {
    expect(recheckDueOn('2027-01-11T04:30:00Z', 'America/New_York', 28)).toBe('2027-02-07')
  })
})
