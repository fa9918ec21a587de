import type { Component, Phase } from './rules'

/** One transfusion as the API answers it. */
export interface TransfusionView {
  id: number
  referralId: number
  givenAt: string
  phase: Phase
  component: Component
  units: number
  preTransfusionHbGL: number | null
  postTransfusionHbGL: number | null
  reassessedBeforeNext: boolean
  informationGiven: boolean
  productCodes: string[]
  reason: string | null
  thresholdGL: number
  thresholdBasis: string
  /** The pre-transfusion Hb is above the patient's threshold (a reason was required). */
  aboveThreshold: boolean
  /** Counts towards QS138 statement 3 (single unit, reassessed, Hb checked). */
  reassessedAfterEachUnit: boolean
  voided: null | { at: string; reason: string }
  recordedAt: string
}

export interface TransfusionList {
  transfusions: TransfusionView[]
  /** The patient's threshold now (for the form), with the guideline it comes from. */
  threshold: { thresholdGL: number; basis: string }
  /** Red-cell units by phase, as the post-operative record shows them (voided rows left out). */
  redCellUnits: { beforeSurgery: number; duringSurgery: number; afterSurgery: number }
}

/** POST, PUT and void of one transfusion: the row and the episode's red-cell units by phase after it. */
export interface TransfusionWrite {
  transfusion: TransfusionView
  redCellUnits: TransfusionList['redCellUnits']
}
