import { ClinicalInputError, requireInRange, requireOneOf, requireSex } from './errors'
import { CLINICAL_LIMITS } from './limits'
import type { Sex } from './types'

export type AnaemiaCriteria = 'who' | 'surgical'
export type AnaemiaSeverity = 'none' | 'mild' | 'moderate' | 'severe'

export interface AnaemiaClassification {
  anaemic: boolean
  severity: AnaemiaSeverity
  /** Hb below this (strictly) is anaemia, g/L. */
  thresholdGL: number
  /** Which rule produced the threshold, for display beside the result. */
  basis: string
}

// Lower edges of the severity bands (WHO 2011, from memory): outside pregnancy mild down to
// 110, moderate 80–109, severe <80; in pregnancy mild 100–109, moderate 70–99, severe <70.
const BANDS = { standard: { mild: 110, moderate: 80 }, pregnancy: { mild: 100, moderate: 70 } } as const

function whoThreshold(sex: Sex, pregnant: boolean, trimester: number | undefined): { gL: number; basis: string } {
  if (pregnant) {
    // WHO 2024 lowered the second-trimester cut-off to 105 g/L; an unknown trimester takes
    // 110 g/L, the higher (more cautious) of the two.
    if (trimester === 2) return { gL: 105, basis: 'WHO 2024, pregnancy, second trimester: Hb < 105 g/L' }
    return { gL: 110, basis: 'WHO 2024, pregnancy (first or third trimester): Hb < 110 g/L' }
  }
  return sex === 'male'
    ? { gL: 130, basis: 'WHO 2024, men: Hb < 130 g/L' }
    : { gL: 120, basis: 'WHO 2024, non-pregnant women: Hb < 120 g/L' }
}

/**
 * Anaemia by Hb (g/L), strict "<" at the threshold.
 * - 'who': WHO 2024 guideline on haemoglobin cut-offs — men 130, non-pregnant women 120,
 *   pregnancy 110 g/L (105 g/L in the second trimester).
 * - 'surgical': Muñoz M et al., Anaesthesia 2017;72:233 (international consensus) — 130 g/L
 *   for both sexes before surgery with expected blood loss > 500 mL.
 * Severity bands are WHO 2011 (from memory): mild from the threshold down to 110 g/L (100 in
 * pregnancy), moderate 80–109 (70–99), severe below 80 (70). Report the WHO and surgical
 * results as separate, labelled outputs.
 */
export function classifyAnaemia(input: {
  hbGL: number
  sex: Sex
  pregnant?: boolean
  pregnancyTrimester?: 1 | 2 | 3
  criteria: AnaemiaCriteria
}): AnaemiaClassification {
  const hbGL = requireInRange('hbGL', input.hbGL, CLINICAL_LIMITS.hbGL)
  const sex = requireSex('sex', input.sex)
  const criteria = requireOneOf('criteria', input.criteria, ['who', 'surgical'] as const)
  const pregnant = input.pregnant === true
  const trimester = input.pregnancyTrimester
  if (trimester !== undefined && ![1, 2, 3].includes(trimester)) {
    throw new ClinicalInputError('pregnancyTrimester', trimester, `pregnancyTrimester must be 1, 2 or 3 (got ${String(trimester)})`)
  }
  if (pregnant && sex === 'male') {
    throw new ClinicalInputError('pregnant', true, "pregnant can only be true when sex is 'female'")
  }

  const { gL, basis } =
    criteria === 'surgical'
      ? { gL: 130, basis: 'Muñoz 2017 consensus, before major surgery: Hb < 130 g/L for both sexes' }
      : whoThreshold(sex, pregnant, trimester)
  const bands = pregnant ? BANDS.pregnancy : BANDS.standard
  let severity: AnaemiaSeverity = 'none'
  if (hbGL < gL) severity = hbGL >= bands.mild ? 'mild' : hbGL >= bands.moderate ? 'moderate' : 'severe'
  return { anaemic: hbGL < gL, severity, thresholdGL: gL, basis }
}
