import { describe, expect, it } from 'vitest'
import { dateInZone, todayInZone, referralFlags, type FlagInput } from '../../../shared/pathway'

// UK summer time is UTC+1 (British Summer Time) from the last Sunday of March to the last
// Sunday of October — common practice, GOV.UK "When do the clocks change".
const LONDON = 'Europe/London'

describe("the clinic's today", () => {
  it('when it is 23:30 UTC on 13 July, then it is already 14 July on the clinic calendar in London', () => {
    expect(todayInZone(LONDON, new Date('2027-07-13T23:30:00Z'))).toBe('2027-07-14')
  })

  it('when it is 23:30 UTC in January, then it is still the same day in London (no summer time)', () => {
    expect(todayInZone(LONDON, new Date('2027-01-13T23:30:00Z'))).toBe('2027-01-13')
  })

  it('when the clinic is in New York and it is 02:00 UTC, then the clinic is still on the previous day', () => {
    expect(todayInZone('America/New_York', new Date('2027-07-14T02:00:00Z'))).toBe('2027-07-13')
  })

  it('when an Hb is taken at 00:30 London summer time, then its clinic date is that day, not the UTC day before', () => {
    expect(dateInZone('2027-07-13T23:30:00.000Z', LONDON)).toBe('2027-07-14')
  })
})

describe('flags on the clinic calendar around midnight', () => {
  const base: FlagInput = {
    stage: 'recheck',
    plannedSurgeryDate: '2027-08-30',
    anaemic: false,
    latestHbAt: null,
    recheckDueDate: '2027-07-14',
    treatmentOrderedAt: null,
    treatmentGivenAt: null,
  }

  it('when the re-check Hb is taken at 00:30 clinic time on its due date, then the re-check is not overdue', () => {
    // 00:30 BST on 14 July is 23:30 UTC on 13 July: read in UTC it would look a day early.
    const flags = referralFlags({ ...base, latestHbAt: '2027-07-13T23:30:00.000Z' }, '2027-07-20', LONDON)
    expect(flags).not.toContain('recheck-overdue')
  })

  it('when the last Hb was taken at 23:30 clinic time the day before the due date, then the re-check is overdue', () => {
    const flags = referralFlags({ ...base, latestHbAt: '2027-07-13T22:30:00.000Z' }, '2027-07-20', LONDON)
    expect(flags).toContain('recheck-overdue')
  })

  it('when surgery is 28 days after the clinic day (the screening window), then an anaemic patient is flagged; at 29 days not', () => {
    const anaemic = { ...base, stage: 'screened' as const, anaemic: true, latestHbAt: '2027-07-01T09:00:00Z', recheckDueDate: null }
    expect(referralFlags({ ...anaemic, plannedSurgeryDate: '2027-08-11' }, '2027-07-14', LONDON)).toContain('surgery-soon-anaemic')
    expect(referralFlags({ ...anaemic, plannedSurgeryDate: '2027-08-12' }, '2027-07-14', LONDON)).not.toContain('surgery-soon-anaemic')
  })
})
