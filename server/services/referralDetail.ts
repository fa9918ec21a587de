import { Patient, Procedure, Referral, Result, StageTransition, SurgeryDateChange, User } from '../models/index'
import { STAGE_LABELS, allowedMoves, daysBetween, isReadOnly, nextAction, referralFlags } from '../../shared/pathway'
import { DATE_CHANGE_REASON_LABELS } from '../../shared/schemas/referrals'
import { CANCELLATION_REASON_LABELS, type CancellationReason } from '../../shared/schemas/cancellations'
import type { DateChangeView } from '../../shared/pathway/dateChanges'
import type { ReferralDetail, ResultView, TimelineItem } from '../../shared/pathway/views'
import { recordAudit } from './audit'
import { toPatientView } from './patients'
import { toProcedureView } from './procedures'
import { toResultView } from './results'
import { screeningView } from './screening'
import { assertMaySeeReferral, isoOrNull, type Viewer } from './viewer'
import { NotFound } from '../errors'
import { clinicTimeZone, clinicToday } from './clinicDay'

type Loaded = Referral & { patient: Patient; procedure: Procedure; surgeon: User }
type TransitionRow = StageTransition & { user?: User | null }

function timelineOf(transitions: TransitionRow[], results: ResultView[]): TimelineItem[] {
  const moves = transitions.map((s) => ({
    kind: 'transition' as const,
    at: isoOrNull(s.at)!,
    from: s.fromStage,
    to: s.toStage,
    toLabel: STAGE_LABELS[s.toStage],
    reason: s.reason,
    user: s.user ? { id: s.user.id, name: s.user.name } : null,
  }))
  // Results sit on the timeline at the time the sample was taken (the clinical moment).
  const labs = results.map((r) => ({ kind: 'result' as const, ...r, at: r.takenAt }))
  return [...moves, ...labs].sort((a, b) => (a.at < b.at ? 1 : a.at > b.at ? -1 : 0))
}

/** The latest result of each analyte (including derived TSAT and eGFR). */
function latestByAnalyte(results: ResultView[]): Record<string, ResultView> {
  const out: Record<string, ResultView> = {}
  for (const r of results) out[r.analyte] ??= r
  return out
}

function toDateChangeView(c: SurgeryDateChange): DateChangeView {
  const by = (c as SurgeryDateChange & { changedByUser?: User | null }).changedByUser
  const kind = c.kind === 'cancelled' ? 'cancelled' : 'moved'
  const reasonLabel =
    kind === 'cancelled'
      ? (CANCELLATION_REASON_LABELS[c.reason as CancellationReason] ?? DATE_CHANGE_REASON_LABELS[c.reason])
      : DATE_CHANGE_REASON_LABELS[c.reason]
  return {
    kind,
    fromDate: c.fromDate,
    toDate: c.toDate,
    reason: c.reason,
    reasonLabel,
    note: c.note,
    changedAt: c.changedAt.toISOString(),
    changedBy: by ? { id: by.id, name: by.name } : null,
  }
}

/**
 * One episode as the episode page shows it: patient header, operation, screening outcome,
 * latest results, flags, the moves this caller may make and the timeline (newest first).
 * `audit: true` records the read (opening a record is audited; returning it after a write is not).
 */
export async function referralDetail(viewer: Viewer, id: number, opts: { audit?: boolean } = {}): Promise<ReferralDetail> {
  const r = (await Referral.findByPk(id, {
    include: [
      { model: Patient, as: 'patient' },
      { model: Procedure, as: 'procedure' },
      { model: User, as: 'surgeon', attributes: ['id', 'name'] },
    ],
  })) as Loaded | null
  if (!r) throw new NotFound('Referral')
  assertMaySeeReferral(viewer, r.surgeonId)
  const [patient, resultRows, transitions, dateChanges] = await Promise.all([
    toPatientView(r.patient),
    Result.findAll({
      where: { referralId: id, voidedAt: null },
      include: [{ model: User, as: 'enteredByUser', attributes: ['id', 'name'] }],
      order: [
        ['takenAt', 'DESC'],
        ['id', 'DESC'],
      ],
    }),
    StageTransition.findAll({
      where: { referralId: id },
      include: [{ model: User, as: 'user', attributes: ['id', 'name'] }],
      order: [
        ['at', 'DESC'],
        ['id', 'DESC'],
      ],
    }),
    SurgeryDateChange.findAll({
      where: { referralId: id },
      include: [{ model: User, as: 'changedByUser', attributes: ['id', 'name'] }],
      order: [
        ['changedAt', 'ASC'],
        ['id', 'ASC'],
      ],
    }),
  ])
  if (opts.audit)
    await recordAudit(null, viewer, { action: 'view', entity: 'referral', entityId: id, patientId: r.patientId, opensRecord: true })
  const results = resultRows.map(toResultView)
  const today = clinicToday()
  return {
    id: r.id,
    version: r.version,
    stage: r.stage,
    stageLabel: STAGE_LABELS[r.stage],
    nextAction: nextAction(r.stage),
    readOnly: isReadOnly(r.stage),
    priority: r.priority,
    referringSource: r.referringSource,
    plannedSurgeryDate: r.plannedSurgeryDate,
    daysToSurgery: daysBetween(today, r.plannedSurgeryDate),
    patientId: r.patientId,
    procedureCode: r.procedure.code,
    surgeonId: r.surgeonId,
    patient: {
      id: patient.id,
      mrn: patient.mrn,
      givenName: patient.givenName,
      familyName: patient.familyName,
      dateOfBirth: patient.dateOfBirth,
      ageYears: patient.ageYears,
      sex: patient.sex,
      heightCm: patient.heightCm,
      heightMeasuredAt: patient.heightMeasuredAt,
      weightKg: patient.weightKg,
      weightMeasuredAt: patient.weightMeasuredAt,
      version: patient.version,
    },
    procedure: toProcedureView(r.procedure),
    surgeon: { id: r.surgeon.id, name: r.surgeon.name },
    screening: screeningView(r, r.patient.sex),
    latestResults: latestByAnalyte(results),
    flags: referralFlags({ ...r.get(), plannedSurgeryDate: r.plannedSurgeryDate }, today, clinicTimeZone()),
    recheckDueDate: r.recheckDueDate,
    treatmentOrderedAt: isoOrNull(r.treatmentOrderedAt),
    treatmentGivenAt: isoOrNull(r.treatmentGivenAt),
    // Set at clinic review; the review form must show the stored answer, not guess it.
    cardiovascularDisease: Boolean(r.cardiovascularDisease),
    // Recorded on the episode; both change the blood plan (migration 0010).
    redCellAntibodies: r.redCellAntibodies ?? null,
    declinesTransfusion: Boolean(r.declinesTransfusion),
    dateChangeRequestedAt: isoOrNull(r.dateChangeRequestedAt),
    listingDate: r.listingDate ?? null,
    // Who moved the surgery date, when and why: the listing-to-surgery story the quality report counts.
    dateChanges: dateChanges.map(toDateChangeView),
    // The latest history row is a cancellation until a new date rebooks the operation.
    surgeryCancelled:
      dateChanges.length > 0 && dateChanges[dateChanges.length - 1]!.kind === 'cancelled'
        ? toDateChangeView(dateChanges[dateChanges.length - 1]!)
        : null,
    allowedMoves: allowedMoves(r.stage, viewer.role),
    timeline: timelineOf(transitions as TransitionRow[], results),
    createdBy: r.createdBy,
    createdAt: isoOrNull(r.createdAt),
    updatedAt: isoOrNull(r.updatedAt),
  }
}
