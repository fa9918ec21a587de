import type { IronDose, IronDosePlan } from '../clinical/ironPlan'
import type { IronProduct } from '../clinical/ironProduct'
import type { Priority } from '../pathway/options'
import type { Stage } from '../pathway/stages'
import type { CautionAnswers, CautionKey } from './cautions'
import type { Diagnosis } from './diagnoses'
import type { Projection } from './projection'
import type { BloodOrderKind, ReadinessFlag, Verdict } from './readiness'

/*
 * The clinic and readiness API's answers (server/services/clinicReview.ts, prescriptions.ts,
 * administrations.ts, readiness.ts). The server's mappers declare these as their return types
 * and the client imports them. GET /api/referrals/:id/projection answers a Projection.
 */

type Person = { id: number; name: string } | null

/** A clinic doctor's review of the episode. */
export interface ClinicReviewView {
  id: number
  diagnosis: Diagnosis
  diagnosisLabel: string
  notes: string | null
  plan: string
  reviewedAt: string
  reviewer: Person
}

/** POST /api/referrals/:id/reviews: the review and the episode's new version. */
export interface RecordedReview {
  review: ClinicReviewView
  version: number
}

/** POST /api/referrals/:id/dose-plan: the plan a prescription would follow, not yet stored. */
export interface DosePlanPreview {
  product: IronProduct
  productSource: string
  inputs: {
    weightKg: number
    weightMeasuredAt: string | null
    heightCm: number | null
    ageYears: number
    hbGL: number
    hbTakenAt: string | null
    targetHbGL: number
    firstDoseDate: string
    plannedSurgeryDate: string
  }
  plan: IronDosePlan
  /** A repeat course of a product that needs a serum phosphate first. */
  phosphate: { needed: boolean; message: string }
  methods: { deficit: string; caps: string }
  cautions: string[]
  cautionQuestions: readonly { readonly key: CautionKey; readonly question: string }[]
}

export type PrescriptionStatus = 'active' | 'completed' | 'cancelled'

/** An iron prescription as stored, with the plan's doses and warnings. */
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
  doses: IronDose[]
  warnings: string[]
  oralSchedule: string | null
  cautions: CautionAnswers | null
  overrideReason: string | null
  status: PrescriptionStatus
  prescribedAt: string
  prescriber: Person
}

/** POST /api/referrals/:id/prescriptions */
export interface RecordedPrescription {
  prescription: PrescriptionView
  version: number
}

export type Reaction = 'none' | 'mild' | 'moderate' | 'severe'

/** One dose given. */
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
  giver: Person
}

/** POST /api/referrals/:id/administrations: the dose, the re-check it schedules and the episode's stage. */
export interface RecordedAdministration {
  administration: AdministrationView
  recheckDueDate: string
  stage: Stage
  version: number
}

export type ReadinessAction = 'acknowledged' | 'date-change-requested'

/** POST /api/referrals/:id/readiness: the operating surgeon's answer. */
export interface ReadinessAnswer {
  id: number
  action: ReadinessAction
  reason: string | null
  at: string
  /** The projection exactly as the surgeon saw it when answering. */
  projection: Projection
}

/** GET /api/referrals/:id/readiness: every answer, newest first. */
export interface ReadinessReviewView extends ReadinessAnswer {
  surgeonId: number | null
}

/** One episode of the readiness board (GET /api/readiness). */
export interface ReadinessRow {
  id: number
  version: number
  stage: Stage
  stageLabel: string
  priority: Priority
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
  lastReview: { action: ReadinessAction; reason: string | null; at: string } | null
  /** Why no projection could be made (e.g. no weight), when verdict is null. */
  missing: string | null
}
