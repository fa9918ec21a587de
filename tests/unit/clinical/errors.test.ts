import { describe, expect, it } from 'vitest'
import { CLINICAL_LIMITS, ClinicalInputError, oxygenContent, saturationFromPo2 } from '../../../shared/clinical'
import { clinicalError } from './helpers'

describe('refusals', () => {
  it('when Hb is 2 g/L, then the message names the input, range, unit and value', () => {
    const error = clinicalError(() => oxygenContent({ hbGL: 2, so2: 0.98, po2MmHg: 100 }))
    expect(error).toBeInstanceOf(Error)
    expect(error.name).toBe('ClinicalInputError')
    expect(error.input).toBe('hbGL')
    expect(error.value).toBe(2)
    expect(error.message).toBe('hbGL must be between 20 and 250 g/L (got 2)')
  })

  it('when a value is NaN, Infinity, missing or a string, then it is refused and shown as received', () => {
    expect(clinicalError(() => saturationFromPo2(Number.NaN)).message).toBe('po2MmHg must be between 0 and 700 mmHg (got NaN)')
    expect(clinicalError(() => saturationFromPo2(Number.POSITIVE_INFINITY)).message).toContain('(got Infinity)')
    expect(clinicalError(() => saturationFromPo2(undefined as never)).message).toContain('(got undefined)')
    expect(clinicalError(() => saturationFromPo2('60' as never)).message).toContain('(got "60")')
  })

  it('when SO2 is 1.5 or 98, then the message says it looks like a percentage; 150 is plainly out of range', () => {
    for (const so2 of [1.5, 98, 100]) {
      expect(clinicalError(() => oxygenContent({ hbGL: 150, so2, po2MmHg: 100 })).message).toContain('looks like a percentage')
    }
    expect(clinicalError(() => oxygenContent({ hbGL: 150, so2: 150, po2MmHg: 100 })).message).toBe(
      'so2 must be between 0 and 1 (fraction) (got 150)',
    )
  })

  it('when the limits are read as data, then they match what the functions enforce', () => {
    expect(CLINICAL_LIMITS.hbGL).toEqual({ min: 20, max: 250, unit: 'g/L' })
    expect(CLINICAL_LIMITS.weightKg).toEqual({ min: 2, max: 350, unit: 'kg' })
    expect(() => oxygenContent({ hbGL: CLINICAL_LIMITS.hbGL.min, so2: 0, po2MmHg: CLINICAL_LIMITS.po2MmHg.max })).not.toThrow()
    expect(() => oxygenContent({ hbGL: CLINICAL_LIMITS.hbGL.max + 0.001, so2: 1, po2MmHg: 0 })).toThrow(ClinicalInputError)
  })
})
