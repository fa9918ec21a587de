import { describe, expect, it } from 'vitest'
import { ironResponse } from '../../../shared/clinic/evidence'
import { responseFlags, treatmentFromDoses } from '../../../shared/clinic/responseFlags'
import { referralFlags, type FlagInput } from '../../../shared/pathway'

// Non-response: < 10 g/L rise by 4 weeks after IV iron (common practice, clinical reference §11);
// falling: 5 g/L or more below the pre-treatment value (common practice).
const ZONE = 'Europe/London'
const iv = { kind: 'iv' as const, firstDoseAt: '2027-02-01T10:00:00Z', lastDoseAt: '2027-02-01T10:00:00Z', totalMg: 1000, deficitMg: null }
const base: FlagInput = {
  stage: 'recheck',
  plannedSurgeryDate: '2027-04-01',
  anaemic: true,
  latestHbAt: '2027-03-05T09:00:00Z',
  recheckDueDate: '2027-03-01',
  treatmentOrderedAt: '2027-01-30T09:00:00Z',
  treatmentGivenAt: '2027-02-01T10:00:00Z',
}

describe('the response to iron as worklist flags', () => {
  it('when Hb goes 100 → 106 g/L 32 days after IV iron, then it is non-response and the worklist shows "no response to IV iron"', () => {
    const r = ironResponse(
      [
        { takenAt: '2027-01-28T09:00:00Z', hbGL: 100 },
        { takenAt: '2027-03-05T09:00:00Z', hbGL: 106 },
      ],
      iv,
      ZONE,
    )
    expect(r).toMatchObject({ nonResponse: true, falling: false })
    expect(referralFlags({ ...base, noResponseToIron: r.nonResponse, hbFallingAfterIron: r.falling }, '2027-03-06', ZONE)).toContain(
      'no-response-to-iron',
    )
  })

  it('when the same 6 g/L rise is measured only 20 days after the dose, then it is too early to call non-response', () => {
    expect(
      ironResponse(
        [
          { takenAt: '2027-01-28T09:00:00Z', hbGL: 100 },
          { takenAt: '2027-02-21T09:00:00Z', hbGL: 106 },
        ],
        iv,
        ZONE,
      ).nonResponse,
    ).toBe(false)
  })

  it('when oral iron is followed by a 6 g/L rise at 5 weeks, then the IV non-response rule does not apply', () => {
    expect(
      ironResponse(
        [
          { takenAt: '2027-01-28T09:00:00Z', hbGL: 100 },
          { takenAt: '2027-03-08T09:00:00Z', hbGL: 106 },
        ],
        { ...iv, kind: 'oral' },
        ZONE,
      ).nonResponse,
    ).toBe(false)
  })

  it(
    'when Hb falls from 120 to 114 g/L after iron, then the worklist shows ' + '"Hb falling after iron"; after surgery no flag is shown',
    () => {
      const r = ironResponse(
        [
          { takenAt: '2027-01-28T09:00:00Z', hbGL: 120 },
          { takenAt: '2027-02-20T09:00:00Z', hbGL: 114 },
        ],
        iv,
        ZONE,
      )
      expect(r.falling).toBe(true)
      expect(referralFlags({ ...base, hbFallingAfterIron: true }, '2027-03-06', ZONE)).toContain('hb-falling')
      expect(referralFlags({ ...base, stage: 'operated', hbFallingAfterIron: true, noResponseToIron: true }, '2027-03-06', ZONE)).toEqual(
        [],
      )
    },
  )
})

describe('the response flags kept on the referral row (shared/clinic/responseFlags.ts)', () => {
  const doses = [
    { givenAt: '2027-02-01T10:00:00Z', doseMg: 500, route: null },
    { givenAt: '2027-02-08T10:00:00Z', doseMg: 500, route: 'iv' as const },
  ]

  it(
    'when two 500 mg doses were recorded, then the course is 1000 mg from the first dose to the last, ' +
      'and a dose with no route counts as IV',
    () => {
      expect(treatmentFromDoses(doses)).toEqual({
        kind: 'iv',
        firstDoseAt: doses[0]!.givenAt,
        lastDoseAt: doses[1]!.givenAt,
        totalMg: 1000,
        deficitMg: null,
      })
      expect(treatmentFromDoses([])).toBeNull()
    },
  )

  it(
    'when Hb goes 100 → 106 g/L 5 weeks after the last IV dose, then the row keeps "no response" and not ' +
      '"falling" (< 10 g/L rise by 4 weeks, common practice, reference §11)',
    () => {
      const hb = [
        { takenAt: '2027-01-28T09:00:00Z', hbGL: 100 },
        { takenAt: '2027-03-15T09:00:00Z', hbGL: 106 },
      ]
      expect(responseFlags(hb, doses, ZONE)).toEqual({ noResponseToIron: true, hbFallingAfterIron: false })
    },
  )

  it(
    'when Hb falls 120 → 114 g/L after iron, then the row keeps "Hb falling" (a fall of 5 g/L or more, ' +
      'common practice); without doses neither flag',
    () => {
      const hb = [
        { takenAt: '2027-01-28T09:00:00Z', hbGL: 120 },
        { takenAt: '2027-02-20T09:00:00Z', hbGL: 114 },
      ]
      expect(responseFlags(hb, doses, ZONE).hbFallingAfterIron).toBe(true)
      expect(responseFlags(hb, [], ZONE)).toEqual({ noResponseToIron: false, hbFallingAfterIron: false })
    },
  )
})
