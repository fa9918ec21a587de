import type { Sequelize, Transaction } from 'sequelize'
import { Outcome, Referral } from '../models/index'
import { isReadOnly } from '../../shared/pathway'
import type { FollowUpInput, OutcomeInput } from '../../shared/schemas/outcomes'
import { outcomeWarnings } from '../../shared/reports/outcomeWarnings'
import type { FollowUpRecorded, OutcomeRead, OutcomeView, TxaTiming } from '../../shared/outcomes/views'
import { changedFields, recordAudit } from './audit'
import { loadReferral, type LoadedReferral } from './episode'
import { redCellUnitsByPhase } from './transfusionCounts'
import { isoOrNull, staleVersion, type Viewer } from './viewer'
import { NotFound, RuleRefused } from '../errors'
import { refreshEpisodeFacts } from './reports/episodeFacts'
import { refreshMilestones } from './reports/referralMilestones'

function toOutcomeView(o: Outcome): OutcomeView {
  return {
    id: o.id,
    referralId: o.referralId,
    surgeryDate: o.surgeryDate,
    bloodLossMl: o.bloodLossMl,
    unitsTransfusedIntraOp: o.unitsTransfusedIntraOp,
    unitsTransfusedPostOp: o.unitsTransfusedPostOp,
    unitsCrossmatched: o.unitsCrossmatched,
    lowestHbGL: o.lowestHbGL,
    dischargeHbGL: o.dischargeHbGL,
    lengthOfStayDays: o.lengthOfStayDays,
    complications: o.complications,
    tranexamicAcidGiven: o.tranexamicAcidGiven ?? null,
    tranexamicAcidDoseMg: o.tranexamicAcidDoseMg ?? null,
    // Stored only after the outcome schema accepted it as one of TXA_TIMINGS.
    tranexamicAcidTiming: (o.tranexamicAcidTiming as TxaTiming | null) ?? null,
    cellSalvageUsed: o.cellSalvageUsed ?? null,
    cellSalvageReturnedMl: o.cellSalvageReturnedMl ?? null,
    transfusionInformationGiven: o.transfusionInformationGiven ?? null,
    transfusionConsent: o.transfusionConsent ?? null,
    postOperativeIronGiven: o.postOperativeIronGiven ?? null,
    followUp:
      o.followUpAt == null
        ? null
        : {
            recheckHbGL: o.followUpRecheckHbGL,
            recheckDate: o.followUpRecheckDate,
            ironAfterSurgery: o.followUpIronAfterSurgery,
            notes: o.followUpNotes,
            recordedAt: isoOrNull(o.followUpAt),
          },
  }
}

/**
 * The checks every post-operative write makes, in the order moveReferral uses: a stale version
 * first, then a closed (read-only) episode, then an episode that has not reached surgery.
 */
export async function lockForWrite(t: Transaction, viewer: Viewer, referralId: number, version: number): Promise<LoadedReferral> {
  const r = await loadReferral(viewer, referralId, t, true)
  if (r.version !== version) throw staleVersion('This referral')
  if (isReadOnly(r.stage)) throw new RuleRefused('This episode is closed and read-only', 'closed_read_only')
  if (r.stage !== 'operated')
    throw new RuleRefused('The post-operative record is kept once the episode is at "Surgery done"', 'not_operated')
  return r
}

export async function bumpVersion(t: Transaction, r: Referral): Promise<number> {
  const [count] = await Referral.update({ version: r.version + 1 }, { where: { id: r.id, version: r.version }, transaction: t })
  if (count !== 1) throw staleVersion('This referral')
  return r.version + 1
}

/** Records (or corrects) the post-operative record; values outside the expected range are saved with warnings. */
export async function recordOutcome(sequelize: Sequelize, viewer: Viewer, referralId: number, input: OutcomeInput): Promise<OutcomeRead> {
  return sequelize.transaction(async (t) => {
    const r = await lockForWrite(t, viewer, referralId, input.version)
    if (input.surgeryDate < r.createdAt.toISOString().slice(0, 10)) {
      throw new RuleRefused('The surgery date is before the referral', 'surgery_before_referral', {
        surgeryDate: 'is before the referral date',
      })
    }
    // Red-cell unit counts are the transfusion record's, never typed here.
    const counts = await redCellUnitsByPhase(referralId, t)
    const values = {
      surgeryDate: input.surgeryDate,
      bloodLossMl: input.bloodLossMl,
      unitsTransfusedIntraOp: counts.duringSurgery,
      unitsTransfusedPostOp: counts.afterSurgery,
      unitsCrossmatched: input.unitsCrossmatched,
      lowestHbGL: input.lowestHbGL,
      dischargeHbGL: input.dischargeHbGL ?? null,
      lengthOfStayDays: input.lengthOfStayDays,
      complications: [...input.complications],
      tranexamicAcidGiven: input.tranexamicAcidGiven ?? null,
      tranexamicAcidDoseMg: input.tranexamicAcidGiven ? (input.tranexamicAcidDoseMg ?? null) : null,
      tranexamicAcidTiming: input.tranexamicAcidGiven ? (input.tranexamicAcidTiming ?? null) : null,
      cellSalvageUsed: input.cellSalvageUsed ?? null,
      cellSalvageReturnedMl: input.cellSalvageUsed ? (input.cellSalvageReturnedMl ?? null) : null,
      transfusionInformationGiven: input.transfusionInformationGiven ?? null,
      transfusionConsent: input.transfusionConsent ?? null,
      postOperativeIronGiven: input.postOperativeIronGiven ?? null,
    }
    const existing = await Outcome.findOne({ where: { referralId }, transaction: t })
    let before: OutcomeView | null = null
    let row: Outcome
    if (existing) {
      before = toOutcomeView(existing)
      row = await existing.update({ ...values, recordedBy: viewer.userId }, { transaction: t })
    } else {
      row = await Outcome.create({ referralId, ...values, recordedBy: viewer.userId }, { transaction: t })
    }
    const version = await bumpVersion(t, r)
    // The surgery date moves every fact that is counted against it.
    await refreshEpisodeFacts(t, [referralId])
    await refreshMilestones(t, [referralId]) // the episode counts as operated, with this surgery date
    const view = toOutcomeView(row)
    const diff = before ? changedFields(before, view) : { before: null, after: view }
    await recordAudit(t, viewer, {
      action: before ? 'update' : 'create',
      entity: 'outcome',
      entityId: row.id,
      patientId: r.patientId,
      before: diff.before,
      after: diff.after,
    })
    return { outcome: view, warnings: outcomeWarnings(values, r.procedure.expectedBloodLossMl), version }
  })
}

/** The follow-up after discharge: needs the post-operative record first. */
export async function recordFollowUp(
  sequelize: Sequelize,
  viewer: Viewer,
  referralId: number,
  input: FollowUpInput,
): Promise<FollowUpRecorded> {
  return sequelize.transaction(async (t) => {
    const r = await lockForWrite(t, viewer, referralId, input.version)
    const o = await Outcome.findOne({ where: { referralId }, transaction: t })
    if (!o) throw new RuleRefused('Record the post-operative outcome before the follow-up', 'outcome_required')
    if (input.recheckDate < o.surgeryDate) {
      throw new RuleRefused('The re-check is before the surgery date', 'recheck_before_surgery', {
        recheckDate: 'is before the surgery date',
      })
    }
    const before = toOutcomeView(o).followUp
    await o.update(
      {
        followUpRecheckHbGL: input.recheckHbGL,
        followUpRecheckDate: input.recheckDate,
        followUpIronAfterSurgery: input.ironAfterSurgery,
        followUpNotes: input.notes ?? null,
        followUpBy: viewer.userId,
        followUpAt: new Date(),
      },
      { transaction: t },
    )
    const version = await bumpVersion(t, r)
    const view = toOutcomeView(o)
    await recordAudit(t, viewer, {
      action: before ? 'update' : 'create',
      entity: 'follow-up',
      entityId: o.id,
      patientId: r.patientId,
      before,
      after: view.followUp,
    })
    return { outcome: view, version }
  })
}

export async function getOutcome(viewer: Viewer, referralId: number): Promise<OutcomeRead> {
  const r = await loadReferral(viewer, referralId)
  const o = await Outcome.findOne({ where: { referralId } })
  if (!o) throw new NotFound('Post-operative record')
  // Read access to clinical data is audited, as opening the episode or the patient is.
  await recordAudit(null, viewer, { action: 'view', entity: 'outcome', entityId: o.id, patientId: r.patientId })
  return { outcome: toOutcomeView(o), warnings: outcomeWarnings(o, r.procedure.expectedBloodLossMl), version: r.version }
}
