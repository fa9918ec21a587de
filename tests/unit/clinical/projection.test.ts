import { describe, expect, it } from 'vitest'
import { EXPECTED_HB_RESPONSE, projectHb, roundHbGL } from '../../../shared/clinical'
import { clinicalError, expectWithin } from './helpers'

// The expected-response numbers are Ferrolane's stated assumption, chosen from "IV iron
// typically raises Hb 10–20 g/L over 4–8 weeks" (secondary source, clinical reference §6).
describe('Hb projection to the surgery date', () => {
  it('when there is no treatment, then the latest value is carried forward', () => {
    const p = projectHb({
      targetDate: '2025-05-01',
      measurements: [
        { takenAt: '2025-03-01', hbGL: 118 },
        { takenAt: '2025-02-01', hbGL: 121 },
      ],
    })
    expect(p).toMatchObject({ hbGL: 118, method: 'latest-value' })
    expect(p.assumptions[0]).toContain('118 g/L on 2025-03-01')
  })

  it('when IV iron was given and there is no re-check, then Hb rises 2.5 g/L a week from day 7 (stated assumption)', () => {
    expect(EXPECTED_HB_RESPONSE.iv).toEqual({ riseGLPerWeek: 2.5, maxRiseGL: 20, onsetDays: 7 })
    // Dose on 1 March; target 5 April = day 35, so 28 days of response = 10 g/L.
    const p = projectHb({
      targetDate: '2025-04-05',
      measurements: [{ takenAt: '2025-02-25', hbGL: 105 }],
      treatment: { kind: 'iv', firstDoseDate: '2025-03-01', totalMg: 1000, deficitMg: 1000 },
    })
    expect(p.method).toBe('expected-response')
    expectWithin(p.hbGL, 115, 1e-9)
    expect(p.assumptions.join(' ')).toContain('2.5 g/L per week')
    expect(p.assumptions.join(' ')).toContain('1000 mg of iron given against a calculated deficit of 1000 mg (100 %)')
  })

  it('when surgery is far off, then the expected IV rise stops at +20 g/L', () => {
    const p = projectHb({
      targetDate: '2025-12-01',
      measurements: [{ takenAt: '2025-02-25', hbGL: 100 }],
      treatment: { kind: 'iv', firstDoseDate: '2025-03-01' },
    })
    expectWithin(p.hbGL, 120, 1e-9)
  })

  it('when oral iron was started, then the assumed rise is 1 g/L a week up to +10 g/L', () => {
    const p = projectHb({
      targetDate: '2025-04-05',
      measurements: [{ takenAt: '2025-02-25', hbGL: 105 }],
      treatment: { kind: 'oral', firstDoseDate: '2025-03-01' },
    })
    expectWithin(p.hbGL, 109, 1e-9)
    const far = projectHb({
      targetDate: '2026-01-01',
      measurements: [{ takenAt: '2025-02-25', hbGL: 105 }],
      treatment: { kind: 'oral', firstDoseDate: '2025-03-01' },
    })
    expectWithin(far.hbGL, 115, 1e-9)
  })

  it('when surgery is within the first week after the dose, then no rise is assumed yet', () => {
    const p = projectHb({
      targetDate: '2025-03-05',
      measurements: [{ takenAt: '2025-03-01', hbGL: 100 }],
      treatment: { kind: 'iv', firstDoseDate: '2025-03-01' },
    })
    expect(p.hbGL).toBe(100)
  })

  it('when the caller states its own assumption, then it is used', () => {
    const p = projectHb({
      targetDate: '2025-04-05',
      measurements: [{ takenAt: '2025-02-25', hbGL: 105 }],
      treatment: { kind: 'iv', firstDoseDate: '2025-03-01' },
      assumption: { riseGLPerWeek: 3.5, onsetDays: 0, maxRiseGL: 30 },
    })
    expectWithin(p.hbGL, 122.5, 1e-9)
  })

  it('when there is a re-check after the first week, then a least-squares trend through baseline and re-checks is used', () => {
    const p = projectHb({
      targetDate: '2025-04-26',
      measurements: [
        { takenAt: '2025-02-22', hbGL: 100 },
        { takenAt: '2025-03-15', hbGL: 106 },
        { takenAt: '2025-03-29', hbGL: 110 },
      ],
      treatment: { kind: 'iv', firstDoseDate: '2025-03-01' },
    })
    expect(p.method).toBe('trend')
    // Days −63, −42, −28 from target; least squares slope 10/35 g/L/day → 2 g/L/week; value at day 0 = 118.
    expectWithin(p.slopeGLPerWeek ?? Number.NaN, 2, 1e-9)
    expectWithin(p.hbGL, 118, 1e-9)
  })

  it('when the trend would overshoot, then it is capped at baseline + 20 g/L because the iron response plateaus', () => {
    const p = projectHb({
      targetDate: '2025-08-01',
      measurements: [
        { takenAt: '2025-02-28', hbGL: 100 },
        { takenAt: '2025-03-28', hbGL: 110 },
      ],
      treatment: { kind: 'iv', firstDoseDate: '2025-03-01' },
    })
    expect(p).toMatchObject({ method: 'trend', hbGL: 120 })
  })

  it(
    'when Hb is falling despite iron, then the fall is extended to the target date (not floored at the lowest re-check) and a ' +
      'review is asked for',
    () => {
      const p = projectHb({
        targetDate: '2025-06-01',
        measurements: [
          { takenAt: '2025-02-28', hbGL: 110 },
          { takenAt: '2025-03-28', hbGL: 104 },
        ],
        treatment: { kind: 'iv', firstDoseDate: '2025-03-01' },
      })
      // Two points, so the line passes through both: −6 g/L in 28 days; 28 Mar → 1 Jun is 65 days,
      // so 104 − 6 × 65/28 = 90.07 g/L (by hand). The old floor showed 104 and hid the fall.
      expectWithin(p.hbGL, 90.07, 0.01)
      expect(p.assumptions.join(' ')).toContain('falling despite iron')
    },
  )

  it('when the only re-check is within the first week, then the expected response is used instead of a trend', () => {
    const p = projectHb({
      targetDate: '2025-04-05',
      measurements: [
        { takenAt: '2025-02-25', hbGL: 105 },
        { takenAt: '2025-03-04', hbGL: 104 },
      ],
      treatment: { kind: 'iv', firstDoseDate: '2025-03-01' },
    })
    expect(p.method).toBe('expected-response')
    expectWithin(p.hbGL, 114, 1e-9)
  })

  it('when the IV dose given is a sixth of the calculated deficit, then the assumed rise and its cap are scaled to that share', () => {
    // 200 mg given of a 1 200 mg deficit; 42 days after the dose: full rule +12.5 g/L → a sixth is 2.08 g/L.
    const p = projectHb({
      targetDate: '2025-04-12',
      measurements: [{ takenAt: '2025-02-25', hbGL: 100 }],
      treatment: { kind: 'iv', firstDoseDate: '2025-03-01', totalMg: 200, deficitMg: 1200 },
    })
    expect(p.method).toBe('expected-response')
    expectWithin(p.hbGL, 100 + 12.5 / 6, 1e-9)
    expect(p.doseFraction).toBeCloseTo(1 / 6, 9)
    expect(p.assumptions.join(' ')).toMatch(/200 mg of iron given against a calculated deficit of 1200 mg \(17 %\)/)
  })

  it(
    'when a full IV course was given 8 weeks before surgery, then the assumed rise lies within the 10–20 g/L over 4–8 weeks that ' +
      'reviews report',
    () => {
      // "IV iron typically raises Hb 10–20 g/L over 4–8 weeks" (secondary source, clinical reference §6 [V2]).
      const p = projectHb({
        targetDate: '2025-04-26', // 56 days after the dose
        measurements: [{ takenAt: '2025-02-25', hbGL: 100 }],
        treatment: { kind: 'iv', firstDoseDate: '2025-03-01', totalMg: 1000, deficitMg: 1000 },
      })
      expect(p.hbGL - 100).toBeGreaterThanOrEqual(10)
      expect(p.hbGL - 100).toBeLessThanOrEqual(20)
    },
  )

  it('when an Hb is taken on the morning of surgery in the clinic zone, then it counts in the projection', () => {
    const p = projectHb({
      targetDate: '2025-07-14',
      timeZone: 'Europe/London',
      measurements: [
        { takenAt: '2025-07-01T09:00:00Z', hbGL: 118 },
        // 07:30 BST on the surgery day (06:30 UTC)
        { takenAt: '2025-07-14T06:30:00Z', hbGL: 124 },
      ],
    })
    expect(p.hbGL).toBe(124)
  })

  it('when an Hb is taken at 00:30 clinic time the day after surgery, then it does not count', () => {
    const p = projectHb({
      targetDate: '2025-07-14',
      timeZone: 'Europe/London',
      measurements: [
        { takenAt: '2025-07-01T09:00:00Z', hbGL: 118 },
        { takenAt: '2025-07-14T23:30:00Z', hbGL: 95 },
      ],
    })
    expect(p.hbGL).toBe(118)
  })

  it('when measurements are later than the target, then only those up to the target are used', () => {
    const p = projectHb({
      targetDate: new Date('2025-03-10T00:00:00Z'),
      measurements: [
        { takenAt: new Date('2025-03-01T00:00:00Z'), hbGL: 101 },
        { takenAt: '2025-03-20', hbGL: 125 },
      ],
    })
    expect(p.hbGL).toBe(101)
  })

  it('when inputs are missing or nonsense, then the projection is refused', () => {
    clinicalError(() => projectHb({ targetDate: '2025-04-01', measurements: [] }))
    clinicalError(() => projectHb({ targetDate: 'next week', measurements: [{ takenAt: '2025-03-01', hbGL: 100 }] }))
    clinicalError(() => projectHb({ targetDate: '2025-01-01', measurements: [{ takenAt: '2025-03-01', hbGL: 100 }] }))
    expect(clinicalError(() => projectHb({ targetDate: '2025-04-01', measurements: [{ takenAt: '2025-03-01', hbGL: 10 }] })).input).toBe(
      'measurements[0].hbGL',
    )
    clinicalError(() =>
      projectHb({
        targetDate: '2025-04-01',
        measurements: [{ takenAt: '2025-03-01', hbGL: 100 }],
        treatment: { kind: 'im' as never, firstDoseDate: '2025-03-01' },
      }),
    )
  })

  it('when a projection is displayed, then it rounds to a whole g/L', () => {
    expect(roundHbGL(114.5)).toBe(115)
    expect(roundHbGL(114.49)).toBe(114)
  })
})
