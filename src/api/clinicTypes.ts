import type { IronDosePlan } from '@shared/clinical/ironPlan'
import type { IronProduct } from '@shared/clinical/ironProduct'
import type { CautionAnswers } from '@shared/clinic/cautions'
import type { Diagnosis } from '@shared/clinic/diagnoses'
import type { Projection } from '@shared/clinic/projection'
import type { ReadinessFlag } from '@shared/clinic/readiness'
import type { BloodOrderKind, Verdict } from '@shared/clinic/readiness'

/**
 * Shapes the clinic and readiness API answers with (server/services/clinicReview.ts,
 * prescriptions.ts, administrations.ts, readiness.ts, formulary.ts). Typed here for the client.
 */
export type { Projection }

export interface ClinicReview {
  id: number
  diagnosis: Diagnosis
  diagnosisLabel: string
  notes: string | null
  plan: string
  reviewedAt: string
  reviewer: { id: number; name: string } | null
}

export interface DosePlanPreview {
  product: IronProduct
  productSource: string
  inputs: {
    weightKg: number; weightMeasuredAt: string | null; heightCm: number | null; ageYears: number; hbGL: number; hbTakenAt: string | null
    targetHbGL: number; firstDoseDate: string; plannedSurgeryDate: string
  }
  plan: IronDosePlan
  /** A repeat course of a product that needs a serum phosphate first. */
  phosphate: { needed: boolean; message: string }
  methods: { deficit: string; caps: string }
  cautions: string[]
  cautionQuestions: { key: keyof CautionAnswers; question: string }[]
}

export interface PrescriptionView {
  id: number
  productCode: string
  route: 'iv' | 'oral'
  weightKg: number
  hbGL: number
  targetHbGL: number
  deficitMg: number
  totalMg: number
  firstDoseDate: string
  doses: { number: number; doseMg: number; dayOffset: number; date?: string; cappedBy: string[] }[]
  warnings: string[]
  oralSchedule: string | null
  cautions: CautionAnswers
  overrideReason: string | null
  status: 'active' | 'completed' | 'cancelled'
  prescribedAt: string
  prescriber: { id: number; name: string } | null
}

export type Reaction = 'none' | 'mild' | 'moderate' | 'severe'

export interface AdministrationView {
  id: number
  prescriptionId: number
  doseMg: number
  givenAt: string
  batchNumber: string
  reaction: Reaction
  reactionNotes: string | null
  /** Why a dose over a cap or the prescribed total was given anyway. */
  overrideReason: string | null
  giver: { id: number; name: string } | null
}

export interface RecordedAdministration {
  administration: AdministrationView
  recheckDueDate: string
  stage: string
  version: number
}

export interface ReadinessReview {
  id: number
  action: 'acknowledged' | 'date-change-requested'
  reason: string | null
  at: string
  surgeonId: number
  /** The projection exactly as the surgeon saw it when answering. */
  projection: Projection
}

export interface ReadinessRow {
  id: number
  version: number
  stage: string
  stageLabel: string
  priority: string
  patient: { id: number; mrn: string; name: string }
  procedure: { code: string; name: string }
  surgeon: { id: number; name: string }
  plannedSurgeryDate: string
  daysToSurgery: number
  verdict: Verdict | null
  verdictLabel: string
  predictedSurgeryHbGL: number | null
  /** The Hb the blood order and verdict rest on (never above the latest measured value). */
  planningHbGL: number | null
  allowableBloodLossMl: number | null
  expectedBloodLossMl: number | null
  bloodOrder: { kind: BloodOrderKind; units: number; decidedBy: string } | null
  /** What must be measured before "ready", in words (empty when nothing is missing). */
  needs: string[]
  /** Concerns beside the verdict (no response to iron, falling Hb, antibodies, declines transfusion). */
  concerns: { key: ReadinessFlag; label: string }[]
  openActions: string[]
  lastReview: { action: ReadinessReview['action']; reason: string | null; at: string } | null
  /** Why no projection could be made (e.g. no weight), when verdict is null. */
  missing: string | null
}

export type { FormularyEntry } from '@shared/formulary/views'
