// Ferrolane's referral pathway as data: stages, the allowed moves and the worklist flags.
// The server enforces it; the client uses the same module to offer only allowed actions.
export { STAGES, STAGE_LABELS, PRE_OPERATIVE_STAGES, READ_ONLY_STAGES, isStage, nextAction, stageOrder } from './stages'
export type { Stage } from './stages'
export { TRANSITIONS, allowedMoves, canMove, findMove, isReadOnly } from './transitions'
export type { Move, MoveRequirement, AllowedMove } from './transitions'
export { WORKLIST_FLAGS, FLAG_LABELS, SURGERY_SOON_DAYS, SURGERY_SOON_BASIS, isWorklistFlag, referralFlags } from './flags'
export type { WorklistFlag, FlagInput } from './flags'
export {
  ANALYTES,
  ANALYTE_DEFS,
  DERIVED_UNITS,
  FOLATE_UG_L_PER_NMOL_L,
  isAnalyte,
  normaliseUnit,
  unitsFor,
  unitRule,
  implausibleValue,
  toCanonical,
} from './analytes'
export type { Analyte, StoredAnalyte } from './analytes'
export { PRIORITIES, PRIORITY_LABELS, BLOOD_ORDERS, DEFAULT_ANAEMIA_CRITERIA } from './options'
export type { Priority, BloodOrder } from './options'
export { todayIso, todayInZone, dateInZone, addDays, daysBetween, ageOn, isIsoDate } from './dates'
