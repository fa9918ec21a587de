import { describe, expect, it } from 'vitest'
import { checkDosesAgainstCaps } from '../../../shared/clinic/doseCheck'
import type { IronProduct } from '../../../shared/clinical'

// Caps from the ferric carboxymaltose EU SmPC as summarised in the clinical reference §6:
// ≤1000 mg a dose, ≤20 mg/kg by infusion, ≤1000 mg a week.
const fcm: IronProduct = {
  code: 'fcm',
  name: 'Ferric carboxymaltose',
  route: 'iv',
  maxSingleDoseMg: 1000,
  maxSingleDoseMgPerKg: 20,
  minIntervalDays: 7,
  maxWeeklyMg: 1000,
  roundToMg: 100,
}

describe('dose schedule against the product caps', () => {
  it('when a 45 kg patient is planned 900 mg then 200 mg a week later, then no cap is crossed (SmPC test case, reference §6)', () => {
    expect(
      checkDosesAgainstCaps(
        fcm,
        45,
        [
          { doseMg: 900, dayOffset: 0 },
          { doseMg: 200, dayOffset: 7 },
        ],
        1148,
      ),
    ).toEqual([])
  })

  it('when a 45 kg patient is given 1000 mg in one dose, then the 20 mg/kg cap (900 mg) is named', () => {
    const v = checkDosesAgainstCaps(fcm, 45, [{ doseMg: 1000, dayOffset: 0 }], 1148)
    expect(v.map((x) => x.cap)).toEqual(['maxSingleDoseMgPerKg'])
    expect(v[0]!.message).toMatch(/20 mg\/kg \(900 mg at 45 kg\)/)
  })

  it('when one dose is 1500 mg, then the single-dose cap is named', () => {
    const v = checkDosesAgainstCaps(fcm, 90, [{ doseMg: 1500, dayOffset: 0 }], 2000)
    expect(v.map((x) => x.cap)).toContain('maxSingleDoseMg')
  })

  it('when two doses are 3 days apart, then the minimum interval and the weekly maximum are named', () => {
    const v = checkDosesAgainstCaps(
      fcm,
      80,
      [
        { doseMg: 1000, dayOffset: 0 },
        { doseMg: 500, dayOffset: 3 },
      ],
      1500,
    )
    expect(v.map((x) => x.cap)).toEqual(['minIntervalDays', 'maxWeeklyMg'])
  })

  it('when the course gives more than the Ganzoni need, then it is refused', () => {
    const v = checkDosesAgainstCaps(
      fcm,
      80,
      [
        { doseMg: 1000, dayOffset: 0 },
        { doseMg: 1000, dayOffset: 7 },
      ],
      1500,
    )
    expect(v.map((x) => x.cap)).toEqual(['calculatedNeed'])
  })
})
