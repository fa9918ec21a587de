import { describe, expect, it } from 'vitest'
import { oxygenConsumption, oxygenContent, oxygenDelivery, oxygenExtraction } from '../../../shared/clinical'
import { clinicalError, expectWithin } from './helpers'

// Check values computed by hand from the standard content formula CaO2 = k·Hb·SO2 + 0.003·PO2
// (clinical reference §1); Hb 15 g/dL is 150 g/L here.
describe('oxygen content', () => {
  it('when Hb is 150 g/L, SaO2 0.98 and PaO2 100 mmHg, then CaO2 is 19.998 mL/dL (computed from the standard formula, k 1.34)', () => {
    expectWithin(oxygenContent({ hbGL: 150, so2: 0.98, po2MmHg: 100 }), 19.998, 0.001)
  })

  it('when the Hüfner factor is 1.36 or 1.39, then CaO2 is 20.292 or 20.733 mL/dL (computed from the standard formula)', () => {
    expectWithin(oxygenContent({ hbGL: 150, so2: 0.98, po2MmHg: 100, hufnerMlPerG: 1.36 }), 20.292, 0.001)
    expectWithin(oxygenContent({ hbGL: 150, so2: 0.98, po2MmHg: 100, hufnerMlPerG: 1.39 }), 20.733, 0.001)
  })

  it('when Hb is 80 g/L at the same saturation, then CaO2 is only 10.806 mL/dL (computed from the standard formula)', () => {
    expectWithin(oxygenContent({ hbGL: 80, so2: 0.98, po2MmHg: 100 }), 10.806, 0.001)
  })

  it(
    'when mixed venous SvO2 is 0.75 and PvO2 40 mmHg with Hb 150 g/L, then CvO2 is 15.195 mL/dL (computed from the standard ' + 'formula)',
    () => {
      expectWithin(oxygenContent({ hbGL: 150, so2: 0.75, po2MmHg: 40 }), 15.195, 0.001)
    },
  )

  it('when the solubility is 0.0031, then the dissolved part at 100 mmHg is 0.31 rather than 0.3 mL/dL', () => {
    const a = oxygenContent({ hbGL: 150, so2: 0.98, po2MmHg: 100, solubilityMlDlMmHg: 0.0031 })
    expectWithin(a - oxygenContent({ hbGL: 150, so2: 0.98, po2MmHg: 100 }), 0.01, 1e-9)
  })

  it('when Hb rises, then oxygen content rises (monotonic)', () => {
    let previous = -1
    for (let hb = 20; hb <= 250; hb += 5) {
      const c = oxygenContent({ hbGL: hb, so2: 0.97, po2MmHg: 95 })
      expect(c).toBeGreaterThan(previous)
      previous = c
    }
  })

  it('when SaO2 is typed as 98 instead of 0.98, then it is refused as a percentage rather than inflating CaO2 100-fold', () => {
    const error = clinicalError(() => oxygenContent({ hbGL: 150, so2: 98, po2MmHg: 100 }))
    expect(error.input).toBe('so2')
    expect(error.message).toContain('looks like a percentage')
  })

  it('when Hb is given in g/dL by mistake, then it is refused naming g/L', () => {
    expect(clinicalError(() => oxygenContent({ hbGL: 15, so2: 0.98, po2MmHg: 100 })).message).toBe(
      'hbGL must be between 20 and 250 g/L (got 15)',
    )
  })
})

describe('delivery, consumption and extraction', () => {
  it(
    'when CO is 5 L/min, CaO2 19.998 and CvO2 15.195, then DO2 999.9, VO2 240.15 mL/min and O2ER 0.2402 (computed from the standard ' +
      'formulas)',
    () => {
      expectWithin(oxygenDelivery({ cardiacOutputLMin: 5, cao2MlDl: 19.998 }), 999.9, 0.01)
      expectWithin(oxygenConsumption({ cardiacOutputLMin: 5, cao2MlDl: 19.998, cvo2MlDl: 15.195 }), 240.15, 0.01)
      expectWithin(oxygenExtraction({ cao2MlDl: 19.998, cvo2MlDl: 15.195 }), 0.2402, 0.0001)
    },
  )

  it('when venous content exceeds arterial content, then the fields are refused as swapped', () => {
    expect(clinicalError(() => oxygenExtraction({ cao2MlDl: 15, cvo2MlDl: 20 })).input).toBe('cvo2MlDl')
    clinicalError(() => oxygenConsumption({ cardiacOutputLMin: 5, cao2MlDl: 15, cvo2MlDl: 20 }))
  })

  it('when arterial content is 0, then extraction is refused', () => {
    clinicalError(() => oxygenExtraction({ cao2MlDl: 0, cvo2MlDl: 0 }))
  })

  it('when the cardiac output is outside 1–20 L/min, then it is refused with the range', () => {
    expect(clinicalError(() => oxygenDelivery({ cardiacOutputLMin: 50, cao2MlDl: 20 })).message).toBe(
      'cardiacOutputLMin must be between 1 and 20 L/min (got 50)',
    )
  })
})
