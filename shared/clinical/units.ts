import { ClinicalInputError, requireInRange, requireOneOf } from './errors'
import { CLINICAL_LIMITS } from './limits'
import type { HbUnit } from './types'

// Hb mmol/L is per Fe-haem monomer (the convention of Dutch and Scandinavian labs); the
// tetramer factor 0.155 would be four times smaller. Source: clinical-reference §7.
export const HB_GDL_TO_MMOL_L = 0.6206
// 760 mmHg / 101.325 kPa (common practice, reference §7).
export const MMHG_PER_KPA = 7.50062
export const CREATININE_UMOL_L_PER_MG_DL = 88.4
export const IRON_UMOL_L_PER_UG_DL = 0.1791
// Two Fe(III) per transferrin molecule of about 79.6 kDa (reference §7, from memory).
export const TIBC_UMOL_L_PER_TRANSFERRIN_G_L = 25.1

const HB_UNITS: readonly HbUnit[] = ['g/L', 'g/dL', 'mmol/L']
const HB_LIMIT_BY_UNIT = {
  'g/L': CLINICAL_LIMITS.hbGL,
  'g/dL': CLINICAL_LIMITS.hbGDl,
  'mmol/L': CLINICAL_LIMITS.hbMmolL,
} as const

function hbToGL(value: number, unit: HbUnit): number {
  if (unit === 'g/L') return value
  if (unit === 'g/dL') return value * 10
  return (value / HB_GDL_TO_MMOL_L) * 10
}

function hbFromGL(gL: number, unit: HbUnit): number {
  if (unit === 'g/L') return gL
  if (unit === 'g/dL') return gL / 10
  return (gL / 10) * HB_GDL_TO_MMOL_L
}

/**
 * Converts haemoglobin between g/L, g/dL and mmol/L (per Fe monomer: g/dL × 0.6206).
 * The value is checked against the plausible Hb range expressed in its own unit, so a
 * g/dL figure sent as g/L is refused rather than converted.
 */
export function convertHb(value: number, from: HbUnit, to: HbUnit): number {
  const fromUnit = requireOneOf('from', from, HB_UNITS)
  const toUnit = requireOneOf('to', to, HB_UNITS)
  const v = requireInRange('hb', value, HB_LIMIT_BY_UNIT[fromUnit])
  return hbFromGL(hbToGL(v, fromUnit), toUnit)
}

/** mmHg → kPa (÷ 7.50062, common practice). */
export function mmHgToKPa(po2MmHg: number): number {
  return requireInRange('po2MmHg', po2MmHg, CLINICAL_LIMITS.po2MmHg) / MMHG_PER_KPA
}

/** kPa → mmHg (× 7.50062, common practice). */
export function kPaToMmHg(po2KPa: number): number {
  return requireInRange('po2KPa', po2KPa, CLINICAL_LIMITS.po2KPa) * MMHG_PER_KPA
}

/** Creatinine µmol/L → mg/dL (÷ 88.4, the factor used with CKD-EPI; Inker, NEJM 2021). */
export function creatinineUmolLToMgDl(creatinineUmolL: number): number {
  return requireInRange('creatinineUmolL', creatinineUmolL, CLINICAL_LIMITS.creatinineUmolL) / CREATININE_UMOL_L_PER_MG_DL
}

/** Creatinine mg/dL → µmol/L (× 88.4). */
export function creatinineMgDlToUmolL(creatinineMgDl: number): number {
  return requireInRange('creatinineMgDl', creatinineMgDl, CLINICAL_LIMITS.creatinineMgDl) * CREATININE_UMOL_L_PER_MG_DL
}

/** Serum iron µg/dL → µmol/L (× 0.1791, from the atomic mass of iron 55.845 g/mol). */
export function ironUgDlToUmolL(ironUgDl: number): number {
  return requireInRange('ironUgDl', ironUgDl, CLINICAL_LIMITS.ironUgDl) * IRON_UMOL_L_PER_UG_DL
}

/** Serum iron µmol/L → µg/dL (÷ 0.1791). */
export function ironUmolLToUgDl(ironUmolL: number): number {
  return requireInRange('ironUmolL', ironUmolL, CLINICAL_LIMITS.ironUmolL) / IRON_UMOL_L_PER_UG_DL
}

/** Total iron-binding capacity (µmol/L) from transferrin (g/L), × 25.1 (reference §7, from memory). */
export function tibcFromTransferrin(transferrinGL: number): number {
  return requireInRange('transferrinGL', transferrinGL, CLINICAL_LIMITS.transferrinGL) * TIBC_UMOL_L_PER_TRANSFERRIN_G_L
}

/** Transferrin saturation in % = serum iron / TIBC × 100 (both µmol/L). */
export function tsatFromIron({ ironUmolL, tibcUmolL }: { ironUmolL: number; tibcUmolL: number }): number {
  const iron = requireInRange('ironUmolL', ironUmolL, CLINICAL_LIMITS.ironUmolL)
  const tibc = requireInRange('tibcUmolL', tibcUmolL, CLINICAL_LIMITS.tibcUmolL)
  // Iron above the binding capacity cannot be a saturation; it signals a unit or entry error.
  if (iron > tibc) {
    throw new ClinicalInputError('ironUmolL', iron, `ironUmolL must not exceed tibcUmolL (got ${iron} > ${tibc} µmol/L)`)
  }
  return (iron / tibc) * 100
}
