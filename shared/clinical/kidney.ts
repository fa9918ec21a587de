import { requireInRange, requireSex } from './errors'
import { CLINICAL_LIMITS } from './limits'
import { CREATININE_UMOL_L_PER_MG_DL } from './units'
import type { Sex } from './types'

/**
 * Estimated GFR in mL/min/1.73 m² by the race-free CKD-EPI 2021 creatinine equation (Inker LA
 * et al., N Engl J Med 2021;385:1737):
 * 142 · min(Scr/κ, 1)^α · max(Scr/κ, 1)^−1.200 · 0.9938^age · (1.012 if female),
 * κ 0.7 (F) / 0.9 (M), α −0.241 (F) / −0.302 (M), Scr in mg/dL (µmol/L ÷ 88.4, IDMS-traceable).
 * Adults only: age below 18 years is refused.
 */
export function egfrCkdEpi2021(input: { creatinineUmolL: number; ageYears: number; sex: Sex }): number {
  const scrUmolL = requireInRange('creatinineUmolL', input.creatinineUmolL, CLINICAL_LIMITS.creatinineUmolL)
  const age = requireInRange('ageYears', input.ageYears, CLINICAL_LIMITS.ageYears)
  const sex = requireSex('sex', input.sex)
  const scr = scrUmolL / CREATININE_UMOL_L_PER_MG_DL
  const female = sex === 'female'
  const kappa = female ? 0.7 : 0.9
  const alpha = female ? -0.241 : -0.302
  const ratio = scr / kappa
  return 142 * Math.min(ratio, 1) ** alpha * Math.max(ratio, 1) ** -1.2 * 0.9938 ** age * (female ? 1.012 : 1)
}
