import { describe, expect, it } from 'vitest'
import {
  allowableBloodLoss,
  HCT_FROM_HB_ASSUMPTION,
  hctFromHbGL,
  redCellNeedFromHct,
  redCellTransfusionNeed,
} from '../../../shared/clinical'
import { clinicalError, expectWithin } from './helpers'

describe('allowable blood loss', () => {
  // The formulas depend only on the ratio Hi/Hf, so Hct 0.40 → 0.25 is the same as 160 → 100 g/L.
  it('when EBV is 5000 mL and Hct falls 0.40 → 0.25, then Gross gives 2307.7 mL (computed from Gross 1983, Anesthesiology 58:277)', () => {
    expectWithin(allowableBloodLoss({ ebvMl: 5000, hbStartGL: 160, hbFloorGL: 100 }), 2307.7, 0.1)
  })

  it(
    'when the same case uses the logarithmic form, then it gives 2350.0 mL (computed from Bourke & Smith 1974, Anesthesiology ' + '41:609)',
    () => {
      expectWithin(allowableBloodLoss({ ebvMl: 5000, hbStartGL: 160, hbFloorGL: 100, method: 'logarithmic' }), 2350.0, 0.1)
    },
  )

  it(
    'when EBV is 4800 mL and Hb falls 130 → 80 g/L, then Gross gives 2285.7 and logarithmic 2330.4 mL (computed from Gross 1983 and ' +
      'Bourke & Smith 1974)',
    () => {
      expectWithin(allowableBloodLoss({ ebvMl: 4800, hbStartGL: 130, hbFloorGL: 80, method: 'gross' }), 2285.7, 0.1)
      expectWithin(allowableBloodLoss({ ebvMl: 4800, hbStartGL: 130, hbFloorGL: 80, method: 'logarithmic' }), 2330.4, 0.1)
    },
  )

  it('when the start is at or below the floor, then no loss is allowable', () => {
    expect(allowableBloodLoss({ ebvMl: 5000, hbStartGL: 80, hbFloorGL: 80 })).toBe(0)
    expect(allowableBloodLoss({ ebvMl: 5000, hbStartGL: 70, hbFloorGL: 80, method: 'logarithmic' })).toBe(0)
  })

  it('when the floor is raised, then the allowable loss falls (monotonic), and the log form is never below Gross', () => {
    let previous = Number.POSITIVE_INFINITY
    for (let floor = 60; floor <= 130; floor += 5) {
      const gross = allowableBloodLoss({ ebvMl: 5000, hbStartGL: 135, hbFloorGL: floor })
      const log = allowableBloodLoss({ ebvMl: 5000, hbStartGL: 135, hbFloorGL: floor, method: 'logarithmic' })
      expect(gross).toBeLessThan(previous)
      expect(log).toBeGreaterThanOrEqual(gross)
      previous = gross
    }
  })

  it('when EBV is implausible, then it is refused', () => {
    expect(clinicalError(() => allowableBloodLoss({ ebvMl: 50, hbStartGL: 130, hbFloorGL: 80 })).input).toBe('ebvMl')
  })
})

describe('red-cell transfusion need (Mercuriali & Inghilleri 1996, Curr Med Res Opin 13:465; working form from memory)', () => {
  it(
    'when EBV is 5000 mL and Hct 0.40 → 0.27, then the tolerated red-cell loss is 650 mL (computed from the Mercuriali working ' + 'form)',
    () => {
      const need = redCellNeedFromHct({ ebvMl: 5000, hctStart: 0.4, hctFloor: 0.27, expectedRedCellLossMl: 900 })
      expectWithin(need.toleratedRedCellMl, 650, 1e-9)
    },
  )

  it(
    'when the predicted red-cell loss is 900 mL, then the deficit is 250 mL and 2 units of 200 mL are needed (computed from the ' +
      'Mercuriali working form)',
    () => {
      const need = redCellNeedFromHct({ ebvMl: 5000, hctStart: 0.4, hctFloor: 0.27, expectedRedCellLossMl: 900 })
      expectWithin(need.deficitMl, 250, 1e-9)
      expect(need.units).toBe(2)
      expect(need.startsBelowFloor).toBe(false)
    },
  )

  it('when the deficit is exactly two units, then floating-point noise does not add a third', () => {
    const need = redCellNeedFromHct({ ebvMl: 5000, hctStart: 0.4, hctFloor: 0.27, expectedRedCellLossMl: 1050 })
    expect(need.units).toBe(2)
  })

  it('when the loss is within tolerance, then no units are needed and the deficit is negative', () => {
    const need = redCellNeedFromHct({ ebvMl: 5000, hctStart: 0.4, hctFloor: 0.27, expectedRedCellLossMl: 300, unitRedCellMl: 180 })
    expect(need.units).toBe(0)
    expectWithin(need.deficitMl, -350, 1e-9)
  })

  it('when Hb is 133 g/L, then Hct is taken as 0.399 by the stated rule of three (common practice)', () => {
    expectWithin(hctFromHbGL(133), 0.399, 1e-12)
    expect(HCT_FROM_HB_ASSUMPTION).toContain('Hb (g/L) × 0.003')
  })

  it(
    'when Hb 133 → 90 g/L, EBV 5000 and expected loss 1500 mL, then 517.1 mL red cells are lost, 645 tolerated, no units (computed ' +
      'from the Mercuriali working form with Hct = Hb × 0.003 and isovolaemic red-cell loss 5000·0.399·(1 − e^−0.3))',
    () => {
      const need = redCellTransfusionNeed({ ebvMl: 5000, hbStartGL: 133, hbFloorGL: 90, expectedLossMl: 1500 })
      expectWithin(need.expectedRedCellLossMl, 517.07, 0.01)
      expectWithin(need.toleratedRedCellMl, 645, 1e-9)
      expect(need.units).toBe(0)
    },
  )

  it('when a patient starts below the floor, then tolerated is 0 and the shortfall is added to the deficit', () => {
    const need = redCellTransfusionNeed({ ebvMl: 5000, hbStartGL: 70, hbFloorGL: 80, expectedLossMl: 1000 })
    expect(need.toleratedRedCellMl).toBe(0)
    expect(need.startsBelowFloor).toBe(true)
    // 5000·0.21·(1 − e^−0.2) = 190.3 lost + 5000 × (0.24 − 0.21) shortfall = 150
    expectWithin(need.deficitMl, 340.33, 0.01)
    expect(need.units).toBe(2)
  })

  it('then blood is asked for exactly when the expected loss exceeds the logarithmic allowable loss (same normovolaemic model)', () => {
    const abl = allowableBloodLoss({ ebvMl: 4200, hbStartGL: 118, hbFloorGL: 70, method: 'logarithmic' })
    expect(redCellTransfusionNeed({ ebvMl: 4200, hbStartGL: 118, hbFloorGL: 70, expectedLossMl: abl - 5 }).units).toBe(0)
    expect(redCellTransfusionNeed({ ebvMl: 4200, hbStartGL: 118, hbFloorGL: 70, expectedLossMl: abl + 5 }).units).toBe(1)
  })

  it('when the expected loss is negative or the unit volume absurd, then it is refused', () => {
    clinicalError(() => redCellTransfusionNeed({ ebvMl: 5000, hbStartGL: 130, hbFloorGL: 80, expectedLossMl: -100 }))
    clinicalError(() => redCellNeedFromHct({ ebvMl: 5000, hctStart: 0.4, hctFloor: 0.27, expectedRedCellLossMl: 900, unitRedCellMl: 0 }))
    expect(clinicalError(() => redCellNeedFromHct({ ebvMl: 5000, hctStart: 40, hctFloor: 0.27, expectedRedCellLossMl: 900 })).input).toBe(
      'hctStart',
    )
  })
})
