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
  const litres =
    sex === 'male' ? 0.3669 * hM ** 3 + 0.03219 * weightKg + 0.6041 : 0.3561 * hM ** 3 + 0.03308 * weightKg + 0.1833
  return litres * 1000
}
