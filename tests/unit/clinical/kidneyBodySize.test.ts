import { describe, expect, it } from 'vitest'
import { bmi, bsaDuBois, bsaMosteller, egfrCkdEpi2021 } from '../../../shared/clinical'
import { clinicalError, expectWithin } from './helpers'

// The sheet gives creatinine in mg/dL; × 88.4 gives the µmol/L the API takes.
const umol = (mgDl: number) => mgDl * 88.4

describe('eGFR by CKD-EPI 2021 (Inker, N Engl J Med 2021;385:1737), values computed from its formula', () => {
  it(
    'when a 55-year-old woman has creatinine 0.9 mg/dL, then eGFR is 75.5 mL/min/1.73 m² (computed from Inker 2021; a secondary ' +
      'page gives ≈76)',
    () => {
      expectWithin(egfrCkdEpi2021({ creatinineUmolL: umol(0.9), ageYears: 55, sex: 'female' }), 75.5, 0.1)
    },
  )

  it('when a 60-year-old man has creatinine 1.2 mg/dL, then eGFR is 69.2 (computed from Inker 2021)', () => {
    expectWithin(egfrCkdEpi2021({ creatinineUmolL: umol(1.2), ageYears: 60, sex: 'male' }), 69.2, 0.1)
  })

  it('when a 50-year-old man has creatinine 0.7 mg/dL, then eGFR is 112.3 (computed from Inker 2021)', () => {
    expectWithin(egfrCkdEpi2021({ creatinineUmolL: umol(0.7), ageYears: 50, sex: 'male' }), 112.3, 0.1)
  })

  it('when a 70-year-old woman has creatinine 2.0 mg/dL, then eGFR is 26.4, stage G4 (computed from Inker 2021)', () => {
    expectWithin(egfrCkdEpi2021({ creatinineUmolL: umol(2.0), ageYears: 70, sex: 'female' }), 26.4, 0.1)
  })

  it('when creatinine rises, then eGFR falls', () => {
    let previous = Number.POSITIVE_INFINITY
    for (let scr = 30; scr <= 1000; scr += 10) {
      const e = egfrCkdEpi2021({ creatinineUmolL: scr, ageYears: 65, sex: 'male' })
      expect(e).toBeLessThan(previous)
      previous = e
    }
  })

  it('when the patient is under 18, then the adult equation is refused', () => {
    expect(clinicalError(() => egfrCkdEpi2021({ creatinineUmolL: 60, ageYears: 16, sex: 'female' })).message).toBe(
      'ageYears must be between 18 and 120 years (got 16)',
    )
  })

  it('when creatinine is given in mg/dL by mistake, then it is refused', () => {
    expect(clinicalError(() => egfrCkdEpi2021({ creatinineUmolL: 1.2, ageYears: 60, sex: 'male' })).input).toBe('creatinineUmolL')
  })
})

describe('body size', () => {
  it('when someone is 165 cm and 65 kg, then BSA is 1.726 (Mosteller, computed) and 1.716 m² (Du Bois 1916, computed)', () => {
    expectWithin(bsaMosteller({ heightCm: 165, weightKg: 65 }), 1.726, 0.001)
    expectWithin(bsaDuBois({ heightCm: 165, weightKg: 65 }), 1.716, 0.001)
  })

  it('when someone is 175 cm and 70 kg, then BMI is 22.86 kg/m² (common practice), Mosteller 1.845 and Du Bois 1.848 m² (computed)', () => {
    expectWithin(bmi({ heightCm: 175, weightKg: 70 }), 22.86, 0.01)
    expectWithin(bsaMosteller({ heightCm: 175, weightKg: 70 }), 1.845, 0.01)
    expectWithin(bsaDuBois({ heightCm: 175, weightKg: 70 }), 1.848, 0.01)
  })

  it('when height is in metres by mistake, then it is refused', () => {
    clinicalError(() => bmi({ heightCm: 1.75, weightKg: 70 }))
    clinicalError(() => bsaMosteller({ heightCm: 175, weightKg: Number.POSITIVE_INFINITY }))
  })
})
