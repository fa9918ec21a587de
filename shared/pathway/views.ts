import type { AppointmentKind, AppointmentStatus } from '../appointments'
import type { AppointmentView, OutboxRow } from '../appointments/views'
import type { Rows } from '../types'
import type { AnaemiaCriteria, AnaemiaSeverity, IronStatus, Sex } from '../clinical'
import type { Role } from '../roles'
import type { DateChangeView } from './dateChanges'
import type { WorklistFlag } from './flags'
import type { BloodOrder, Priority } from './options'
import type { Stage } from './stages'
import type { AllowedMove } from './transitions'

/**
 * GET /api/worklist/counts: every count tile of a home screen in one answer. `total` is the
 * slice the filters describe; `flags` holds, for each flag asked for, how many episodes of that
 * slice carry it (the same number GET /api/worklist?flag=… gives as its total).
 */
export interface WorklistCounts {
  total: number
  flags: Partial<Record<WorklistFlag, number>>
}

/*
 * The pathway API's answers (server/services/worklist.ts, referralDetail.ts, results.ts,
 * patients.ts, procedures.ts, staff.ts). The server's mappers declare these as their return
 * types and the client imports them, so the two sides cannot drift apart unnoticed.
 */

/** The soonest future visit of an episode that is not cancelled. */
export interface NextAppointment {
  kind: AppointmentKind
  startsAt: string
  status: AppointmentStatus
}

/** One row of GET /api/worklist. */
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
  nextAppointment: NextAppointment | null
}

/** GET /api/worklist */
export interface WorklistPage {
  rows: WorklistRow[]
  total: number
  page: number
  pageSize: number
}

/** A laboratory's status for the value (HL7 v2 OBX-11): only final and corrected values are screened. */
export type ResultStatus = 'final' | 'corrected' | 'preliminary'

/** One laboratory value as stored (canonical unit), with what was reported. */
export interface ResultView {
  id: number
  analyte: string
  value: number
  unit: string
  valueReported: number | null
  unitReported: string | null
  takenAt: string
  /** manual, derived, or the import that brought it (lab CSV, FHIR, HL7). */
  source: string
  derivedFrom: number[] | null
  enteredBy: { id: number; name: string } | null
  createdAt: string
  /** Typed-in results are final. */
  status: ResultStatus
  /** '<' etc. when the laboratory reported a value beyond a limit: the value is that limit. */
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

/** Results sit on the timeline at the time the sample was taken. */
export type TimelineItem = TransitionItem | (ResultView & { kind: 'result'; at: string })

/** The screening outcome stored on the episode, with the rule it was judged by. */
export interface ScreeningView {
  anaemic: boolean | null
  severity: AnaemiaSeverity | null
  ironStatus: IronStatus | null
  proposedStage: Stage | null
  proposedStageLabel: string | null
  criteria: AnaemiaCriteria
  thresholdGL: number
  basis: string
  ironCriteria: string
  latestHbGL: number | null
  latestHbAt: string | null
}

/** One operation of the catalogue (GET /api/procedures). */
export interface ProcedureView {
  code: string
  name: string
  specialty: string
  expectedBloodLossMl: number | null
  transfusionRate: number | null
  usualBloodOrder: BloodOrder
  usualUnits: number
  source: string
  active: boolean
}

/** GET /api/referrals/:id, and the answer of every write to an episode. */
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
  procedure: ProcedureView
  surgeon: { id: number; name: string }
  screening: ScreeningView
  latestResults: Record<string, ResultView>
  flags: WorklistFlag[]
  recheckDueDate: string | null
  treatmentOrderedAt: string | null
  treatmentGivenAt: string | null
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
  createdBy: number | null
  createdAt: string | null
  updatedAt: string | null
}

/** POST /api/referrals/:id/results: the value, what was derived from it and the new screening. */
export interface AddedResult {
  result: ResultView
  derived: ResultView[]
  screening: ScreeningView
  referral: { id: number; version: number; stage: Stage }
}

/** One row of the patient search (GET /api/patients?q=). */
export interface PatientSummary {
  id: number
  mrn: string
  givenName: string
  familyName: string
  dateOfBirth: string
  sex: Sex
}

/** A patient's record with the current height and weight (POST and PATCH /api/patients). */
export interface PatientView extends PatientSummary {
  ageYears: number
  email: string | null
  phone: string | null
  gpPractice: string | null
  notes: string | null
  heightCm: number | null
  heightMeasuredAt: string | null
  weightKg: number | null
  weightMeasuredAt: string | null
  version: number
  createdAt: string
  updatedAt: string
}

/** GET /api/patients/:id: the record with measurement history and the episodes the caller may see. */
export interface PatientRecord extends PatientView {
  measurements: { id: number; heightCm: number | null; weightKg: number | null; measuredAt: string | null; recordedBy: number | null }[]
  referrals: { id: number; stage: Stage; stageLabel: string; plannedSurgeryDate: string; procedureName: string | null }[]
}

/** An active colleague for a picker (GET /api/staff): names only. */
export interface StaffOption {
  id: number
  name: string
  role: Role
}

/**
 * GET /api/referrals/:id/updates: what changes on an open episode, in one conditional answer, so
 * the episode screen polls once instead of once per part. `messages` is null for a role that may
 * not read the patient's messages (outbox.read).
 */
export interface EpisodeUpdates {
  detail: ReferralDetail
  appointments: Rows<AppointmentView>
  messages: Rows<OutboxRow> | null
}
