import { describe, expect, it } from 'vitest'
import { estimatedBloodVolume } from '../../../shared/clinical'
import { clinicalError, expectWithin } from './helpers'

describe('estimated blood volume', () => {
  it('when a man is 175 cm and 70 kg, then Nadler gives 4824 mL (computed from Nadler 1962, Surgery 51:224; ±1 mL)', () => {
    expectWithin(estimatedBloodVolume({ sex: 'male', heightCm: 175, weightKg: 70 }), 4824, 1)
  })

  it('when a woman is 160 cm and 60 kg, then Nadler gives 3627 mL (computed from Nadler 1962; ±1 mL)', () => {
    expectWithin(estimatedBloodVolume({ sex: 'female', heightCm: 160, weightKg: 60 }), 3627, 1)
  })

  it('when a woman is 170 cm and 120 kg, then Nadler gives 5902 mL (computed from Nadler 1962; ±1 mL)', () => {
    expectWithin(estimatedBloodVolume({ sex: 'female', heightCm: 170, weightKg: 120, method: 'nadler' }), 5902, 1)
  })

  it('when the weight-based method is chosen, then a man gets 70 mL/kg and a woman 65 mL/kg (Morgan & Mikhail, via teaching pages)', () => {
    expect(estimatedBloodVolume({ sex: 'male', weightKg: 80, method: 'weight' })).toBe(5600)
    expect(estimatedBloodVolume({ sex: 'female', heightCm: null, weightKg: 60, method: 'weight' })).toBe(3900)
  })

  it('when Nadler is asked for without a height, then it is refused and the caller must choose the fallback', () => {
    const error = clinicalError(() => estimatedBloodVolume({ sex: 'female', weightKg: 60 }))
    expect(error.input).toBe('heightCm')
    expect(error.message).toContain("method 'weight'")
  })

  it('when the sex or height is nonsense, then it is refused', () => {
    clinicalError(() => estimatedBloodVolume({ sex: 'other' as never, heightCm: 170, weightKg: 70 }))
    expect(clinicalError(() => estimatedBloodVolume({ sex: 'male', heightCm: 1.75, weightKg: 70 })).message).toBe(
      'heightCm must be between 40 and 250 cm (got 1.75)',
    )
  })

  it('when weight rises at a fixed height, then Nadler blood volume rises', () => {
    const a = estimatedBloodVolume({ sex: 'male', heightCm: 175, weightKg: 70 })
    const b = estimatedBloodVolume({ sex: 'male', heightCm: 175, weightKg: 90 })
    expectWithin(b - a, 20 * 32.19, 1e-6)
  })
})
