// Public API of Ferrolane's clinical calculations. Pure functions, canonical units in names.
export { ClinicalInputError } from './errors'
export { CLINICAL_LIMITS } from './limits'
export type { Limit, ClinicalLimitName } from './limits'
export type { Sex, HbUnit } from './types'

export {
  convertHb,
  mmHgToKPa,
  kPaToMmHg,
  creatinineUmolLToMgDl,
  creatinineMgDlToUmolL,
  ironUgDlToUmolL,
  ironUmolLToUgDl,
  tibcFromTransferrin,
  tsatFromIron,
  HB_GDL_TO_MMOL_L,
  MMHG_PER_KPA,
  CREATININE_UMOL_L_PER_MG_DL,
} from './units'

export { saturationFromPo2, po2FromSaturation, severinghausInversePo2, STANDARD_P50_MMHG, DEFAULT_HILL_N } from './dissociation'
export type { DissociationModel, DissociationOptions } from './dissociation'

export {
  oxygenContent,
  oxygenDelivery,
  oxygenConsumption,
  oxygenExtraction,
  DEFAULT_HUFNER_ML_PER_G,
  DEFAULT_SOLUBILITY_ML_DL_MMHG,
} from './oxygen'
export type { OxygenContentInput } from './oxygen'

export {
  estimatedBloodVolume,
  patientBloodVolume,
  lemmensIndexedMlPerKg,
  BloodVolumeRefusal,
  LEAN_MASS_BMI,
  WEIGHT_BASED_ML_PER_KG,
} from './bloodVolume'
export type { BloodVolumeMethod, BloodVolumeInput, PatientBloodVolume } from './bloodVolume'

export {
  allowableBloodLoss,
  redCellTransfusionNeed,
  redCellNeedFromHct,
  hctFromHbGL,
  HCT_FROM_HB_ASSUMPTION,
  DEFAULT_UNIT_RED_CELL_ML,
} from './bloodLoss'
export type { AllowableLossMethod, RedCellNeed } from './bloodLoss'

export { ganzoniIronDeficit, ganzoniStoresMg, fcmSimplifiedNeedMg, GANZONI_FACTOR_G_L } from './iron'
export { validateIronProduct } from './ironProduct'
export type { IronProduct } from './ironProduct'
export { ironDosePlan } from './ironPlan'
export type { IronDose, IronDoseCap, IronDosePlan } from './ironPlan'

export { classifyAnaemia } from './anaemia'
export type { AnaemiaCriteria, AnaemiaSeverity, AnaemiaClassification } from './anaemia'
export { classifyIronStatus, isIronDeficient, IRON_STATUS_CRITERIA } from './ironStatus'
export type { IronStatus } from './ironStatus'

export { egfrCkdEpi2021 } from './kidney'
export { bmi, bsaMosteller, bsaDuBois } from './bodySize'

export { projectHb, roundHbGL, EXPECTED_HB_RESPONSE } from './projection'
export type { HbMeasurement, HbTreatment, ResponseAssumption, HbProjection } from './projection'

export { hbAfterIsovolaemicLoss } from './haemodilution'

export {
  crossmatchToTransfusionRatio,
  transfusionProbabilityPercent,
  transfusionIndex,
  suggestBloodOrder,
  ACCEPTABLE_CT_RATIO,
  CROSSMATCH_JUSTIFIED_TI,
  LOW_TRANSFUSION_PROBABILITY_PERCENT,
} from './bloodOrdering'
export type { BloodOrderingCounts, BloodOrderSuggestion } from './bloodOrdering'
export { ironNeed, idealBodyWeightKg, tableNeedMg, validateDosingTable, LOW_WEIGHT_TARGET_HB_GL, OBESITY_BMI } from './ironNeed'
export type { IronDosingTable, IronNeed } from './ironNeed'
export { surgeryTiming, IV_TOO_LATE_DAYS, ORAL_FIRST_MIN_DAYS, ORAL_FIRST_SOURCE } from './ironTiming'
export type { SurgeryTiming } from './ironTiming'
export { IronPlanRefusal, paediatricCheck, ADULT_AGE_YEARS } from './ironPlan'
export { dosingTableProblems, draftToTable, tableToDraft, bandLabel, DOSING_TABLE_MAX_BANDS } from './dosingTableBands'
export type { DosingBand, DosingTableDraft, DosingTableProblem } from './dosingTableBands'
