import type { AppointmentKind, AppointmentStatus } from '@shared/appointments'
import type { AllowedMove, Priority, Stage, WorklistFlag } from '@shared/pathway'
import type { IronStatus, Sex } from '@shared/clinical'
import type { DateChangeView } from '@shared/pathway/dateChanges'

/**
 * Shapes the pathway API answers with (server/services/worklist.ts, referralDetail.ts,
 * results.ts, patients.ts). Typed here for the client only; the server builds them.
 */
export interface WorklistRow {
  id: number
  version: number
  stage: Stage
  stageLabel: string
  nextAction: string
  priority: Priority
  plannedSurgeryDate: string
  daysToSurgery: number
  latestHbGL: number | null
  latestHbAt: string | null
  ironStatus: IronStatus | null
  anaemic: boolean | null
  proposedStage: Stage | null
  flags: WorklistFlag[]
  mrn: string
  patientName: string
  patient: { id: number; mrn: string; givenName: string; familyName: string; dateOfBirth: string; sex: Sex }
  procedure: { code: string; name: string }
  surgeon: { id: number; name: string }
  /** The soonest future visit that is not cancelled (server/services/worklist.ts). */
  nextAppointment: { kind: AppointmentKind; startsAt: string; status: AppointmentStatus } | null
}

export interface WorklistPage {
  rows: WorklistRow[]
  total: number
  page: number
  pageSize: number
}

export interface ResultView {
  id: number
  analyte: string
  value: number
  unit: string
  valueReported: number | null
  unitReported: string | null
  takenAt: string
  source: 'manual' | 'derived' | string
  derivedFrom: number[] | null
  enteredBy: { id: number; name: string } | null
  createdAt: string
  status: string
  comparator: string | null
  voidedAt: string | null
  voidReason: string | null
  /** The laboratory's reference range (OBX-7) and abnormal flags (OBX-8) as sent; null for values typed in. */
  referenceRange: string | null
  abnormalFlags: string | null
}

export interface TransitionItem {
  kind: 'transition'
  at: string
  from: Stage | null
  to: Stage
  toLabel: string
  reason: string | null
  user: { id: number; name: string } | null
}

export type TimelineItem = TransitionItem | (ResultView & { kind: 'result'; at: string })

export interface Screening {
  anaemic: boolean | null
  severity: 'none' | 'mild' | 'moderate' | 'severe' | null
  ironStatus: IronStatus | null
  proposedStage: Stage | null
  proposedStageLabel: string | null
  criteria: 'who' | 'surgical'
  thresholdGL: number
  basis: string
  ironCriteria: string
  latestHbGL: number | null
  latestHbAt: string | null
}

export interface Procedure {
  code: string
  name: string
  specialty: string
  expectedBloodLossMl: number | null
  transfusionRate: number | null
  usualBloodOrder: string
  usualUnits: number
  source: string
  active: boolean
}

export interface ReferralDetail {
  id: number
  version: number
  stage: Stage
  stageLabel: string
  nextAction: string
  readOnly: boolean
  priority: Priority
  referringSource: string | null
  plannedSurgeryDate: string
  daysToSurgery: number
  patientId: number
  procedureCode: string
  surgeonId: number
  patient: {
    id: number
    mrn: string
    givenName: string
    familyName: string
    dateOfBirth: string
    ageYears: number
    sex: Sex
    heightCm: number | null
    heightMeasuredAt: string | null
    weightKg: number | null
    weightMeasuredAt: string | null
    version: number
  }
  procedure: Procedure
  surgeon: { id: number; name: string }
  screening: Screening
  latestResults: Record<string, ResultView>
  flags: WorklistFlag[]
  recheckDueDate: string | null
  /** Recorded at clinic review; selects the 80 g/L trigger. */
  cardiovascularDisease: boolean
  redCellAntibodies: boolean | null
  declinesTransfusion: boolean
  dateChangeRequestedAt: string | null
  /** The decision to operate. */
  listingDate: string | null
  dateChanges: DateChangeView[]
  /** Set while the planned operation stands cancelled (until a new date rebooks it). */
  surgeryCancelled: DateChangeView | null
  allowedMoves: AllowedMove[]
  timeline: TimelineItem[]
}

export interface PatientSummary {
  id: number
  mrn: string
  givenName: string
  familyName: string
  dateOfBirth: string
  sex: Sex
}

export interface StaffOption {
  id: number
  name: string
  role: string
}
