import { describe, expect, it } from 'vitest'
import { classifyAnaemia, classifyIronStatus, isIronDeficient } from '../../../shared/clinical'
import { clinicalError } from './helpers'

describe('anaemia by WHO 2024 cut-offs and the Muñoz 2017 surgical threshold', () => {
  it(
    'when a man has Hb 125 g/L, then he is mildly anaemic by WHO 2024 and ' + 'anaemic by the surgical threshold (clinical reference §5)',
    () => {
      expect(classifyAnaemia({ hbGL: 125, sex: 'male', criteria: 'who' })).toMatchObject({
        anaemic: true,
        severity: 'mild',
        thresholdGL: 130,
      })
      expect(classifyAnaemia({ hbGL: 125, sex: 'male', criteria: 'surgical' })).toMatchObject({ anaemic: true, thresholdGL: 130 })
    },
  )

  it(
    'when a woman has Hb 125 g/L, then she is not anaemic by WHO 2024 but is by the surgical 130 g/L threshold (Muñoz 2017, ' +
      'secondary source)',
    () => {
      expect(classifyAnaemia({ hbGL: 125, sex: 'female', criteria: 'who' })).toMatchObject({
        anaemic: false,
        severity: 'none',
        thresholdGL: 120,
      })
      expect(classifyAnaemia({ hbGL: 125, sex: 'female', criteria: 'surgical' })).toMatchObject({
        anaemic: true,
        severity: 'mild',
        thresholdGL: 130,
      })
    },
  )

  it('when Hb is exactly 130 g/L, then the patient is not anaemic (strict "<", WHO 2024 and Muñoz 2017)', () => {
    expect(classifyAnaemia({ hbGL: 130, sex: 'male', criteria: 'who' }).anaemic).toBe(false)
    expect(classifyAnaemia({ hbGL: 130, sex: 'female', criteria: 'surgical' }).anaemic).toBe(false)
  })

  it('when the Hb is 129 g/L in a man, then he is mildly anaemic by WHO', () => {
    expect(classifyAnaemia({ hbGL: 129, sex: 'male', criteria: 'who' })).toMatchObject({ anaemic: true, severity: 'mild' })
  })

  it('when Hb is exactly 120 g/L in a non-pregnant woman, then she is not anaemic by WHO; 119 is mild', () => {
    expect(classifyAnaemia({ hbGL: 120, sex: 'female', criteria: 'who' }).anaemic).toBe(false)
    expect(classifyAnaemia({ hbGL: 119, sex: 'female', criteria: 'who' }).severity).toBe('mild')
  })

  it('when Hb is at the severity edges, then bands are mild ≥110, moderate 80–109, severe <80 (WHO 2011, from memory)', () => {
    const severity = (hbGL: number) => classifyAnaemia({ hbGL, sex: 'male', criteria: 'who' }).severity
    expect([severity(110), severity(109.9), severity(80), severity(79.9), severity(40)]).toEqual([
      'mild',
      'moderate',
      'moderate',
      'severe',
      'severe',
    ])
  })

  it('when a woman is pregnant, then the cut-off is 110 g/L, or 105 g/L in the second trimester (WHO 2024)', () => {
    expect(classifyAnaemia({ hbGL: 108, sex: 'female', pregnant: true, pregnancyTrimester: 1, criteria: 'who' })).toMatchObject({
      anaemic: true,
      thresholdGL: 110,
    })
    expect(classifyAnaemia({ hbGL: 108, sex: 'female', pregnant: true, pregnancyTrimester: 2, criteria: 'who' })).toMatchObject({
      anaemic: false,
      thresholdGL: 105,
    })
    expect(classifyAnaemia({ hbGL: 108, sex: 'female', pregnant: true, criteria: 'who' }).thresholdGL).toBe(110)
  })

  it('when a pregnant woman has Hb 95 or 65 g/L, then pregnancy bands apply: moderate 70–99, severe <70 (WHO 2011, from memory)', () => {
    expect(classifyAnaemia({ hbGL: 95, sex: 'female', pregnant: true, criteria: 'who' }).severity).toBe('moderate')
    expect(classifyAnaemia({ hbGL: 65, sex: 'female', pregnant: true, criteria: 'who' }).severity).toBe('severe')
  })

  it('when the result is shown, then it names its basis', () => {
    expect(classifyAnaemia({ hbGL: 125, sex: 'female', criteria: 'surgical' }).basis).toContain('Muñoz 2017')
  })

  it('when inputs contradict or are out of range, then they are refused', () => {
    clinicalError(() => classifyAnaemia({ hbGL: 125, sex: 'male', pregnant: true, criteria: 'who' }))
    clinicalError(() => classifyAnaemia({ hbGL: 125, sex: 'female', criteria: 'nice' as never }))
    clinicalError(() => classifyAnaemia({ hbGL: 125, sex: 'female', pregnant: true, pregnancyTrimester: 4 as never, criteria: 'who' }))
    expect(clinicalError(() => classifyAnaemia({ hbGL: 12.5, sex: 'female', criteria: 'who' })).message).toBe(
      'hbGL must be between 20 and 250 g/L (got 12.5)',
    )
  })
})

describe('iron status (Muñoz 2017 consensus cut-offs, from memory)', () => {
  it('when ferritin is 25 µg/L, then there is absolute iron deficiency (Muñoz 2017, from memory)', () => {
    expect(classifyIronStatus({ ferritinUgL: 25 })).toBe('absolute-deficiency')
  })

  it('when ferritin is 60 µg/L with TSAT 15 %, then iron is restricted — deficiency with inflammation (Muñoz 2017, from memory)', () => {
    expect(classifyIronStatus({ ferritinUgL: 60, tsatPct: 15 })).toBe('iron-restricted')
  })

  it('when ferritin is 150 µg/L with TSAT 15 %, then iron is restricted — sequestration (Muñoz 2017, from memory)', () => {
    expect(classifyIronStatus({ ferritinUgL: 150, tsatPct: 15 })).toBe('iron-restricted')
  })

  it('when ferritin is exactly 30 µg/L, then it is not absolute deficiency (strict "<30")', () => {
    expect(classifyIronStatus({ ferritinUgL: 29.9, tsatPct: 25 })).toBe('absolute-deficiency')
    expect(classifyIronStatus({ ferritinUgL: 30, tsatPct: 25, crpMgL: 2 })).toBe('replete')
  })

  it('when ferritin is exactly 100 µg/L with CRP 10 mg/L, then the "<100 with inflammation" rule no longer applies', () => {
    expect(classifyIronStatus({ ferritinUgL: 99.9, tsatPct: 25, crpMgL: 10 })).toBe('iron-restricted')
    expect(classifyIronStatus({ ferritinUgL: 100, tsatPct: 25, crpMgL: 10 })).toBe('replete')
  })

  it('when CRP is exactly 5 mg/L or TSAT exactly 20 %, then neither counts (strict ">5" and "<20")', () => {
    expect(classifyIronStatus({ ferritinUgL: 60, tsatPct: 20, crpMgL: 5 })).toBe('replete')
    expect(classifyIronStatus({ ferritinUgL: 60, tsatPct: 19.9, crpMgL: 5 })).toBe('iron-restricted')
    expect(classifyIronStatus({ ferritinUgL: 60, crpMgL: 5.1 })).toBe('iron-restricted')
  })

  it('when ferritin is 30–99 µg/L and neither TSAT nor CRP is known, then the status is indeterminate', () => {
    expect(classifyIronStatus({ ferritinUgL: 60 })).toBe('indeterminate')
    expect(classifyIronStatus({ ferritinUgL: 60, tsatPct: null, crpMgL: null })).toBe('indeterminate')
    expect(classifyIronStatus({ ferritinUgL: 60, crpMgL: 2 })).toBe('indeterminate')
  })

  it('when ferritin is 100 µg/L or more without a TSAT, then the status is indeterminate (TSAT is needed to exclude sequestration)', () => {
    expect(classifyIronStatus({ ferritinUgL: 250, crpMgL: 1 })).toBe('indeterminate')
    expect(classifyIronStatus({ ferritinUgL: 250, tsatPct: 30 })).toBe('replete')
  })

  it('when the status is deficiency or restriction, then isIronDeficient is true; otherwise false', () => {
    expect(['absolute-deficiency', 'iron-restricted', 'replete', 'indeterminate'].map((s) => isIronDeficient(s as never))).toEqual([
      true,
      true,
      false,
      false,
    ])
  })

  it('when TSAT is above 100 % or ferritin negative, then they are refused', () => {
    expect(clinicalError(() => classifyIronStatus({ ferritinUgL: 60, tsatPct: 150 })).message).toBe(
      'tsatPct must be between 0 and 100 % (got 150)',
    )
    clinicalError(() => classifyIronStatus({ ferritinUgL: -1 }))
    clinicalError(() => classifyIronStatus({ ferritinUgL: 60, crpMgL: Number.NaN }))
  })
})
