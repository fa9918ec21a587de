import { describe, expect, it } from 'vitest'
import { po2FromSaturation, saturationFromPo2, severinghausInversePo2 } from '../../../shared/clinical'
import { clinicalError, expectWithin } from './helpers'

describe('Severinghaus 1979 eq. 1 (J Appl Physiol 46:599), values computed from its formula', () => {
  const cases: [number, number][] = [
    [26.8, 0.4986],
    [40, 0.7495],
    [60, 0.9058],
    [100, 0.9775],
    [10, 0.0965],
    [20, 0.3198],
    [150, 0.9932],
  ]
  for (const [po2, s] of cases) {
    it(`when PO2 is ${po2} mmHg, then SO2 is ${s} (computed from Severinghaus 1979 eq. 1, ±1e-4)`, () => {
      expectWithin(saturationFromPo2(po2), s, 1e-4)
    })
  }

  it('when compared with Severinghaus Table 1 data (secondary source), then eq. 1 is within 0.55 %', () => {
    const table: [number, number][] = [
      [50, 0.8508],
      [60, 0.9085],
      [80, 0.9584],
      [100, 0.9749],
    ]
    for (const [po2, s] of table) expectWithin(saturationFromPo2(po2), s, 0.0055)
  })

  it('when PO2 is 0, then SO2 is 0, and the curve rises with PO2 everywhere', () => {
    expect(saturationFromPo2(0)).toBe(0)
    let previous = 0
    for (let po2 = 1; po2 <= 700; po2 += 1) {
      const s = saturationFromPo2(po2)
      expect(s).toBeGreaterThan(previous)
      previous = s
    }
  })

  it(
    'when P50 is 19 mmHg (fetal-like), then SO2 at 26.8 mmHg is 0.7184 (computed from Severinghaus 1979 eq. 1 with Kelman 1966 P50 ' +
      'shift)',
    () => {
      expectWithin(saturationFromPo2(26.8, { p50MmHg: 19 }), 0.7184, 1e-4)
    },
  )

  it('when P50 is raised to 30 mmHg (late pregnancy, common practice), then SO2 at 40 mmHg falls (right shift)', () => {
    expect(saturationFromPo2(40, { p50MmHg: 30 })).toBeLessThan(saturationFromPo2(40))
  })

  it('when checked against the rule of thumb (common practice), then 60 mmHg gives about 90 % and above 70 mmHg more than 93 %', () => {
    expectWithin(saturationFromPo2(60), 0.9, 0.01)
    expect(saturationFromPo2(70.5)).toBeGreaterThan(0.93)
  })
})

describe('Hill equation (n 2.7, P50 26.8 mmHg), values computed from the formula', () => {
  const cases: [number, number][] = [
    [26.8, 0.5],
    [40, 0.7467],
    [60, 0.8981],
    [100, 0.9722],
  ]
  for (const [po2, s] of cases) {
    it(`when PO2 is ${po2} mmHg, then Hill SO2 is ${s} (computed from the Hill equation, ±1e-4)`, () => {
      expectWithin(saturationFromPo2(po2, { model: 'hill' }), s, 1e-4)
    })
  }

  it('when the P50 is chosen, then SO2 is exactly one half at that PO2', () => {
    expectWithin(saturationFromPo2(19, { model: 'hill', p50MmHg: 19 }), 0.5, 1e-12)
    expectWithin(saturationFromPo2(30, { model: 'hill', p50MmHg: 30, hillN: 2.2 }), 0.5, 1e-12)
  })
})

describe('PO2 from saturation', () => {
  it(
    'when SO2 is 0.5 / 0.75 / 0.9 / 0.975, then the exact inverse of eq. 1 gives 26.86 / 40.04 / 58.66 / 96.48 mmHg (Ellis 1989 ' +
      'inverse values, from memory)',
    () => {
      const cases: [number, number][] = [
        [0.5, 26.86],
        [0.75, 40.04],
        [0.9, 58.66],
        [0.975, 96.48],
      ]
      for (const [s, po2] of cases) expectWithin(po2FromSaturation(s), po2, 0.02)
    },
  )

  it(
    'when Severinghaus eq. 2 is used, then SO2 0.5 / 0.75 / 0.9 / 0.975 gives 26.83 / 40.21 / 57.98 / 96.56 mmHg (computed from ' +
      'Severinghaus 1979 eq. 2)',
    () => {
      const cases: [number, number][] = [
        [0.5, 26.83],
        [0.75, 40.21],
        [0.9, 57.98],
        [0.975, 96.56],
      ]
      for (const [s, po2] of cases) expectWithin(severinghausInversePo2(s), po2, 0.02)
    },
  )

  it('when PO2 goes to SO2 and back, then it returns within 1e-6 mmHg for both models and shifted P50s', () => {
    const options = [{}, { p50MmHg: 19 }, { p50MmHg: 30 }, { model: 'hill' as const }, { model: 'hill' as const, p50MmHg: 19, hillN: 2.4 }]
    for (const option of options) {
      for (const po2 of [0.5, 5, 20, 26.8, 40, 60, 100, 200, 400]) {
        expectWithin(po2FromSaturation(saturationFromPo2(po2, option), option), po2, 1e-6)
      }
    }
  })

  it('when SO2 goes to PO2 and back, then it returns within 1e-9', () => {
    for (const s of [1e-6, 0.01, 0.3, 0.5, 0.75, 0.97, 0.999]) {
      expectWithin(saturationFromPo2(po2FromSaturation(s)), s, 1e-9)
      expectWithin(saturationFromPo2(po2FromSaturation(s, { model: 'hill' }), { model: 'hill' }), s, 1e-9)
    }
  })

  it('when SO2 is 0, then PO2 is 0 mmHg, because both curves pass through the origin', () => {
    expect(po2FromSaturation(0)).toBe(0)
    expect(po2FromSaturation(0, { model: 'hill' })).toBe(0)
  })

  it('when SO2 is exactly 1, then there is no finite PO2 and it is refused', () => {
    expect(clinicalError(() => po2FromSaturation(1)).message).toContain('no finite PO2')
    clinicalError(() => severinghausInversePo2(1))
  })

  it('when SO2 lies on the flat top beyond 700 mmHg, then it is refused', () => {
    expect(clinicalError(() => po2FromSaturation(0.99999)).message).toContain('above 700 mmHg')
  })

  it('when SO2 is given as a percentage, then the message says it looks like a percentage', () => {
    expect(clinicalError(() => po2FromSaturation(97)).message).toContain('looks like a percentage')
  })

  it('when the model or P50 is nonsense, then it is refused', () => {
    clinicalError(() => saturationFromPo2(40, { model: 'kelman' as never }))
    expect(clinicalError(() => saturationFromPo2(40, { p50MmHg: 0 })).input).toBe('p50MmHg')
    expect(clinicalError(() => saturationFromPo2(-1)).message).toBe('po2MmHg must be between 0 and 700 mmHg (got -1)')
  })
})
