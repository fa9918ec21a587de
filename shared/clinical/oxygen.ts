import { ClinicalInputError, optionalInRange, requireInRange, requireSaturation } from './errors'
import { CLINICAL_LIMITS } from './limits'

// 1.34 mL O2/g is the usual anaesthesia/ICU value; 1.39 is theoretical and overstates capacity
// (Dijkhuizen, Pflügers Arch 1977). 0.003 mL/dL/mmHg is the usual dissolved-O2 coefficient.
export const DEFAULT_HUFNER_ML_PER_G = 1.34
export const DEFAULT_SOLUBILITY_ML_DL_MMHG = 0.003

export interface OxygenContentInput {
  hbGL: number
  so2: number
  po2MmHg: number
  hufnerMlPerG?: number
  solubilityMlDlMmHg?: number
}

/**
 * Oxygen content of arterial or venous blood in mL O2/dL:
 * C = k·Hb(g/dL)·SO2 + α·PO2 (standard physiology; reference §1), k default 1.34 mL/g,
 * α default 0.003 mL/dL/mmHg. Hb is taken in g/L and divided by 10 inside.
 */
export function oxygenContent(input: OxygenContentInput): number {
  const hbGL = requireInRange('hbGL', input.hbGL, CLINICAL_LIMITS.hbGL)
  const so2 = requireSaturation('so2', input.so2)
  const po2 = requireInRange('po2MmHg', input.po2MmHg, CLINICAL_LIMITS.po2MmHg)
  const k = optionalInRange('hufnerMlPerG', input.hufnerMlPerG, CLINICAL_LIMITS.hufnerMlPerG) ?? DEFAULT_HUFNER_ML_PER_G
  const alpha =
    optionalInRange('solubilityMlDlMmHg', input.solubilityMlDlMmHg, CLINICAL_LIMITS.solubilityMlDlMmHg) ?? DEFAULT_SOLUBILITY_ML_DL_MMHG
  return k * (hbGL / 10) * so2 + alpha * po2
}

/**
 * Oxygen delivery DO2 in mL O2/min = CO (L/min) · CaO2 (mL/dL) · 10 (dL per L).
 * Standard physiology (reference §1).
 */
export function oxygenDelivery({ cardiacOutputLMin, cao2MlDl }: { cardiacOutputLMin: number; cao2MlDl: number }): number {
  const co = requireInRange('cardiacOutputLMin', cardiacOutputLMin, CLINICAL_LIMITS.cardiacOutputLMin)
  const cao2 = requireInRange('cao2MlDl', cao2MlDl, CLINICAL_LIMITS.cao2MlDl)
  return co * cao2 * 10
}

function contents(cao2MlDl: number, cvo2MlDl: number): { cao2: number; cvo2: number } {
  const cao2 = requireInRange('cao2MlDl', cao2MlDl, CLINICAL_LIMITS.cao2MlDl)
  const cvo2 = requireInRange('cvo2MlDl', cvo2MlDl, CLINICAL_LIMITS.cao2MlDl)
  // Venous blood cannot hold more O2 than the arterial blood feeding it; that ordering is
  // the usual sign of swapped fields.
  if (cvo2 > cao2) {
    throw new ClinicalInputError('cvo2MlDl', cvo2, `cvo2MlDl must not exceed cao2MlDl (got ${cvo2} > ${cao2} mL O2/dL)`)
  }
  return { cao2, cvo2 }
}

/**
 * Oxygen consumption VO2 in mL O2/min by the Fick principle: CO · (CaO2 − CvO2) · 10.
 */
export function oxygenConsumption(input: { cardiacOutputLMin: number; cao2MlDl: number; cvo2MlDl: number }): number {
  const co = requireInRange('cardiacOutputLMin', input.cardiacOutputLMin, CLINICAL_LIMITS.cardiacOutputLMin)
  const { cao2, cvo2 } = contents(input.cao2MlDl, input.cvo2MlDl)
  return co * (cao2 - cvo2) * 10
}

/**
 * Oxygen extraction ratio (fraction 0–1) = (CaO2 − CvO2) / CaO2. Resting normal ≈ 0.25.
 */
export function oxygenExtraction({ cao2MlDl, cvo2MlDl }: { cao2MlDl: number; cvo2MlDl: number }): number {
  const { cao2, cvo2 } = contents(cao2MlDl, cvo2MlDl)
  if (cao2 === 0) {
    throw new ClinicalInputError('cao2MlDl', cao2, 'cao2MlDl must be above 0 mL O2/dL to compute an extraction ratio (got 0)')
  }
  return (cao2 - cvo2) / cao2
}
