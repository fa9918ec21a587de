import { ClinicalInputError, requireInRange, requireOneOf, requireSex } from './errors'
import { CLINICAL_LIMITS } from './limits'
import type { Sex } from './types'

export type BloodVolumeMethod = 'nadler' | 'weight'

// Adult figures from teaching pages citing Morgan & Mikhail: men 70–75 mL/kg, women 65 mL/kg.
// We take 70 for men, the lower end: a smaller blood volume gives a smaller allowable loss, so
// the error falls on the side of having blood ready. Infants (80) and neonates (85–95) are
// out of scope for a pre-operative adult clinic.
export const WEIGHT_BASED_ML_PER_KG: Readonly<Record<Sex, number>> = { male: 70, female: 65 }

export interface BloodVolumeInput {
  sex: Sex
  heightCm?: number | null
  weightKg: number
  method?: BloodVolumeMethod
}

/**
 * Estimated blood volume in mL (unrounded).
 *
 * - 'nadler' (default): Nadler SB, Hidalgo JU, Bloch T, Surgery 1962;51:224, with height in m
 *   and weight in kg giving litres — men 0.3669·H³ + 0.03219·W + 0.6041, women
 *   0.3561·H³ + 0.03308·W + 0.1833. Needs a height: without one it throws ClinicalInputError
 *   and the caller decides on (and states) the weight-based fallback.
 * - 'weight': men 70 mL/kg, women 65 mL/kg (Morgan & Mikhail, via teaching pages).
 *
 * Both overestimate blood volume in obesity (secondary sources); callers should say so.
 */
export function estimatedBloodVolume(input: BloodVolumeInput): number {
  const sex = requireSex('sex', input.sex)
  const weightKg = requireInRange('weightKg', input.weightKg, CLINICAL_LIMITS.weightKg)
  const method = input.method === undefined ? 'nadler' : requireOneOf('method', input.method, ['nadler', 'weight'] as const)
  if (method === 'weight') return weightKg * WEIGHT_BASED_ML_PER_KG[sex]

  if (input.heightCm === undefined || input.heightCm === null) {
    throw new ClinicalInputError(
      'heightCm',
      input.heightCm,
      "heightCm is required for the Nadler method (between 40 and 250 cm); use method 'weight' if no height is known",
    )
  }
  const hM = requireInRange('heightCm', input.heightCm, CLINICAL_LIMITS.heightCm) / 100
  const litres = sex === 'male' ? 0.3669 * hM ** 3 + 0.03219 * weightKg + 0.6041 : 0.3561 * hM ** 3 + 0.03308 * weightKg + 0.1833
  return litres * 1000
}

/** BMI from which blood volume is estimated for lean mass (WHO obesity class I starts at 30). */
export const LEAN_MASS_BMI = 30
/** Lemmens' reference BMI: at BMI 22 the indexed blood volume is 70 mL/kg. */
const LEMMENS_REFERENCE_BMI = 22

/**
 * Indexed blood volume in mL/kg by Lemmens HJM, Bernstein DP, Brodsky JB, "Estimating blood
 * volume in obese and morbidly obese patients", Obes Surg 2006;16:773–6: 70 / √(BMI / 22).
 * Fat holds little blood, so mL per kg of actual weight falls as BMI rises.
 */
export function lemmensIndexedMlPerKg(bmiKgM2: number): number {
  const b = requireInRange('bmi', bmiKgM2, { min: 8, max: 150, unit: 'kg/m²' })
  return 70 / Math.sqrt(b / LEMMENS_REFERENCE_BMI)
}

/**
 * Thrown when a patient's blood volume cannot be estimated safely: without a height neither
 * Nadler nor Lemmens can be used, and 70 mL/kg of actual weight overstates blood volume in
 * obesity by up to half (Lemmens 2006). The caller answers 422 naming `height`.
 */
export class BloodVolumeRefusal extends ClinicalInputError {
  readonly code = 'height_required'
  constructor() {
    super(
      'height',
      null,
      "height is required to estimate blood volume (Nadler 1962, or Lemmens 2006 when BMI ≥ 30); record the patient's height",
    )
  }
}

export interface PatientBloodVolume {
  ml: number
  method: 'nadler' | 'lemmens'
  /** What a clinician reads beside the figure. */
  methodName: string
  bmi: number
}

/**
 * A patient's blood volume for projections: Nadler 1962 when BMI < 30; Lemmens 2006
 * (70/√(BMI/22) mL/kg × actual weight) when BMI ≥ 30. No height → BloodVolumeRefusal.
 */
export function patientBloodVolume(input: { sex: Sex; heightCm?: number | null; weightKg: number }): PatientBloodVolume {
  if (input.heightCm === undefined || input.heightCm === null) throw new BloodVolumeRefusal()
  const heightCm = requireInRange('heightCm', input.heightCm, CLINICAL_LIMITS.heightCm)
  const weightKg = requireInRange('weightKg', input.weightKg, CLINICAL_LIMITS.weightKg)
  const bmi = weightKg / (heightCm / 100) ** 2
  if (bmi >= LEAN_MASS_BMI) {
    const perKg = lemmensIndexedMlPerKg(bmi)
    return {
      ml: perKg * weightKg,
      method: 'lemmens',
      bmi,
      methodName: `Lemmens 2006 (Obes Surg 16:773): ${Math.round(perKg)} mL/kg at BMI ${Math.round(bmi)}, because BMI ≥ ${LEAN_MASS_BMI}`,
    }
  }
  return {
    ml: estimatedBloodVolume({ sex: input.sex, heightCm, weightKg, method: 'nadler' }),
    method: 'nadler',
    bmi,
    methodName: 'Nadler 1962 (Surgery 51:224), from height, weight and sex',
  }
}
