import { describe, expect, it } from 'vitest'
import {
  aboveThreshold,
  defaultPhase,
  isIsbt128ProductCode,
  reassessedAfterEachUnit,
  transfusionThreshold,
} from '../../../shared/transfusion/rules'

// Check values: AABB 2023 international guidelines (Carson et al., JAMA 2023), Recommendation 1:
// 7 g/dL for stable hospitalised adults; 7.5 g/dL in cardiac surgery; 8 g/dL in orthopaedic
// surgery or pre-existing cardiovascular disease (wording checked against the published abstract).
describe('transfusionThreshold (AABB 2023)', () => {
  it.each([
    ['Colorectal surgery', false, 70],
    ['Cardiac surgery', false, 75],
    ['Cardiac surgery', true, 75],
    ['Orthopaedics', false, 80],
    ['Urology', true, 80],
  ])('when the operation is %s and cardiovascular disease is %s, then the threshold is %i g/L', (specialty, cvd, gl) => {
    const t = transfusionThreshold({ specialty, cardiovascularDisease: cvd })
    expect(t.thresholdGL).toBe(gl)
    expect(t.basis).toMatch(/AABB 2023/)
  })

  it('when the Hb is at the threshold, then it is not above it; one g/L more is', () => {
    const t = transfusionThreshold({ specialty: 'Orthopaedics', cardiovascularDisease: false })
    expect(aboveThreshold(80, t)).toBe(false)
    expect(aboveThreshold(81, t)).toBe(true)
    expect(aboveThreshold(null, t)).toBe(false)
  })
})

describe('ISBT 128 product code format (from memory of ICCBBA ST-001; format only)', () => {
  it.each(['E0336V00', 'E0791VA0', 'E4521V0a', 'S0123000'])('when the code is %s, then it is accepted', (c) =>
    expect(isIsbt128ProductCode(c)).toBe(true),
  )
  it.each(['e0336V00', '=<E0336V00', 'E336V00', 'E0336V000', 'E0336Va0', ''])('when the code is "%s", then it is refused', (c) =>
    expect(isIsbt128ProductCode(c)).toBe(false),
  )
})

describe('QS138 statement 3 per transfusion', () => {
  const base = { component: 'red-cells' as const, units: 1, reassessedBeforeNext: true, postTransfusionHbGL: 80 }
  it('when a single red-cell unit is followed by ' + 'reassessment and an Hb, then it counts', () =>
    expect(reassessedAfterEachUnit(base)).toBe(true),
  )
  it('when two units are given together, then it does not', () => expect(reassessedAfterEachUnit({ ...base, units: 2 })).toBe(false))
  it('when no Hb was checked after the ' + 'unit, then it does not', () =>
    expect(reassessedAfterEachUnit({ ...base, postTransfusionHbGL: null })).toBe(false),
  )
  it('when the patient was not ' + 'reassessed, then it does not', () =>
    expect(reassessedAfterEachUnit({ ...base, reassessedBeforeNext: false })).toBe(false),
  )
})

describe('defaultPhase', () => {
  it('when given the day before surgery, then before surgery; on the day or later, after', () => {
    expect(defaultPhase('2025-04-09T22:00:00.000Z', '2025-04-10')).toBe('before-surgery')
    expect(defaultPhase('2025-04-10T08:00:00.000Z', '2025-04-10')).toBe('after-surgery')
  })
})
