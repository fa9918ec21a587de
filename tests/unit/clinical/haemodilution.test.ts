import { describe, expect, it } from 'vitest'
import { allowableBloodLoss, hbAfterIsovolaemicLoss, ClinicalInputError } from '../../../shared/clinical'

describe('Hb after isovolaemic blood loss', () => {
  it(
    "when 4800 mL of blood volume loses 2330.4 mL from 130 g/L, then Hb ends at 80 g/L (inverse of the reference sheet's log ABL " +
      'vector, Bourke & Smith 1974)',
    () => {
      // Clinical reference §4: EBV 4800, Hb 130 → 80 g/L gives logarithmic ABL 2330.4 mL (computed from Bourke & Smith's formula).
      expect(hbAfterIsovolaemicLoss({ ebvMl: 4800, hbStartGL: 130, lossMl: 2330.4 })).toBeCloseTo(80, 2)
    },
  )

  it('then it is the exact inverse of the logarithmic allowable blood loss', () => {
    const loss = allowableBloodLoss({ ebvMl: 5200, hbStartGL: 124, hbFloorGL: 70, method: 'logarithmic' })
    expect(hbAfterIsovolaemicLoss({ ebvMl: 5200, hbStartGL: 124, lossMl: loss })).toBeCloseTo(70, 6)
  })

  it('when nothing is lost, then Hb is unchanged; when the loss is negative, then it is refused', () => {
    expect(hbAfterIsovolaemicLoss({ ebvMl: 5000, hbStartGL: 120, lossMl: 0 })).toBe(120)
    expect(() => hbAfterIsovolaemicLoss({ ebvMl: 5000, hbStartGL: 120, lossMl: -5 })).toThrow(ClinicalInputError)
  })
})
