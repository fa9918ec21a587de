import { describe, expect, it } from 'vitest'
import { BloodVolumeRefusal, estimatedBloodVolume, lemmensIndexedMlPerKg, patientBloodVolume } from '../../../shared/clinical'
import { expectWithin } from './helpers'

describe('blood volume that respects body size', () => {
  it(
    'when BMI is 22, then Lemmens gives 70 mL/kg (Lemmens, Obes Surg 2006;16:773: 70/√(BMI/22); formula as described by the R ' +
      'package physiology, bloodvol)',
    () => {
      expectWithin(lemmensIndexedMlPerKg(22), 70, 0.001)
    },
  )

  it('when BMI is 40, then Lemmens gives about 52 mL/kg (Lemmens 2006 table, from memory; ±1)', () => {
    expectWithin(lemmensIndexedMlPerKg(40), 52, 1)
  })

  it(
    'when a 150 kg man of 180 cm is projected, then blood volume is about 7 L by Lemmens, not 10.5 L (issue 13 clinical review: ' +
      'about 7 L by lean-mass methods)',
    () => {
      const bv = patientBloodVolume({ sex: 'male', heightCm: 180, weightKg: 150 })
      expect(bv.method).toBe('lemmens')
      expect(bv.methodName).toMatch(/Lemmens 2006/)
      expect(bv.ml).toBeGreaterThan(6500)
      expect(bv.ml).toBeLessThan(7600)
    },
  )

  it('when BMI is under 30, then Nadler is used and named', () => {
    const bv = patientBloodVolume({ sex: 'female', heightCm: 160, weightKg: 60 })
    expect(bv.method).toBe('nadler')
    expect(bv.methodName).toMatch(/Nadler 1962/)
  })

  it('when no height is recorded, then blood volume is refused with a typed refusal naming height', () => {
    let caught: unknown
    try {
      patientBloodVolume({ sex: 'male', heightCm: null, weightKg: 150 })
    } catch (e) {
      caught = e
    }
    expect(caught).toBeInstanceOf(BloodVolumeRefusal)
    expect((caught as BloodVolumeRefusal).input).toBe('height')
    expect((caught as BloodVolumeRefusal).message).toMatch(/height is required/)
  })

  it(
    'when Nadler is checked against a published worked example, then a man of 180 cm and 80 kg has about 5.3 L and a woman of 160 ' +
      'cm and 60 kg about 3.6 L (R package cliot, blood_volume_calculation examples)',
    () => {
      expectWithin(estimatedBloodVolume({ sex: 'male', heightCm: 180, weightKg: 80 }) / 1000, 5.3, 0.05)
      expectWithin(estimatedBloodVolume({ sex: 'female', heightCm: 160, weightKg: 60 }) / 1000, 3.6, 0.05)
    },
  )
})
