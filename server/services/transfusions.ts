import type { Sequelize, Transaction } from 'sequelize'
import { Outcome, Transfusion } from '../models/index'
import { addDays, isReadOnly } from '../../shared/pathway'
import {
  aboveThreshold,
  defaultPhase,
  reassessedAfterEachUnit,
  transfusionThreshold,
  type Component,
  type Phase,
  type Threshold,
} from '../../shared/transfusion/rules'
import type { TransfusionList, TransfusionView, TransfusionWrite } from '../../shared/transfusion/views'
import type { EditTransfusionInput, TransfusionInput } from '../../shared/schemas/transfusions'
import { changedFields, recordAudit } from './audit'
import { loadReferral, type LoadedReferral } from './episode'
import { redCellUnitsByPhase, syncOutcomeUnits } from './transfusionCounts'
import { isoOrNull, type Viewer } from './viewer'
import { NotFound, RuleRefused } from '../errors'

export function toTransfusionView(t: Transfusion): TransfusionView {
  const row = {
    component: t.component,
    units: t.units,
    reassessedBeforeNext: Boolean(t.reassessedBeforeNext),
    postTransfusionHbGL: t.postTransfusionHbGL,
  }
  return {
    id: t.id,
    referralId: t.referralId,
    givenAt: t.givenAt.toISOString(),
    phase: t.phase,
    component: t.component,
    units: t.units,
    preTransfusionHbGL: t.preTransfusionHbGL,
    postTransfusionHbGL: t.postTransfusionHbGL,
    reassessedBeforeNext: row.reassessedBeforeNext,
    informationGiven: Boolean(t.informationGiven),
    productCodes: t.productCodes ?? [],
    reason: t.reason,
    thresholdGL: t.thresholdGL,
    thresholdBasis: t.thresholdBasis,
    aboveThreshold:
      t.component === 'red-cells' && aboveThreshold(t.preTransfusionHbGL, { thresholdGL: t.thresholdGL, basis: t.thresholdBasis }),
    reassessedAfterEachUnit: reassessedAfterEachUnit(row),
    voided: t.voidedAt ? { at: t.voidedAt.toISOString(), reason: t.voidReason ?? '' } : null,
    recordedAt: isoOrNull(t.createdAt)!,
  }
}

const thresholdOf = (r: LoadedReferral): Threshold =>
  transfusionThreshold({ specialty: r.procedure.specialty, cardiovascularDisease: Boolean(r.cardiovascularDisease) })

/** Transfusions are part of the post-operative record: an operated, open episode with that record. */
async function lockForTransfusion(t: Transaction, viewer: Viewer, referralId: number) {
  const r = await loadReferral(viewer, referralId, t, true)
  if (isReadOnly(r.stage)) throw new RuleRefused('This episode is closed and read-only', 'closed_read_only')
  if (r.stage !== 'operated') throw new RuleRefused('Transfusions are recorded once the episode is at "Surgery done"', 'not_operated')
  const outcome = await Outcome.findOne({ where: { referralId }, transaction: t })
  if (!outcome) throw new RuleRefused('Record the post-operative outcome (with the surgery date) before transfusions', 'outcome_required')
  return { r, outcome }
}

/** The rules that need the patient: the admission window, the threshold and the product codes. */
function checkAgainstReferral(r: LoadedReferral, outcome: Outcome, input: TransfusionInput, threshold: Threshold): void {
  const givenDay = input.givenAt.toISOString().slice(0, 10)
  if (givenDay < r.createdAt.toISOString().slice(0, 10)) {
    throw new RuleRefused('The transfusion is dated before the referral', 'given_before_referral', {
      givenAt: 'is before the referral date',
    })
  }
  const discharge = addDays(outcome.surgeryDate, outcome.lengthOfStayDays)
  if (givenDay > discharge) {
    throw new RuleRefused(`The transfusion is dated after discharge (${discharge})`, 'given_after_discharge', {
      givenAt: `is after discharge on ${discharge}`,
    })
  }
  if (input.component === 'red-cells' && aboveThreshold(input.preTransfusionHbGL, threshold) && !input.reason) {
    throw new RuleRefused(
      `A pre-transfusion Hb of ${input.preTransfusionHbGL} g/L is above this patient's threshold (${threshold.basis}): give the reason`,
      'reason_required',
      {
        reason: `is required when the pre-transfusion Hb is above ${threshold.thresholdGL} g/L`,
      },
    )
  }
  if ((input.productCodes ?? []).length > input.units) {
    throw new RuleRefused('There are more product codes than units', 'too_many_codes', {
      productCodes: `at most one code per unit (${input.units})`,
    })
  }
}

function valuesOf(input: TransfusionInput, outcome: Outcome, threshold: Threshold) {
  const phase: Phase = input.phase ?? defaultPhase(input.givenAt.toISOString(), outcome.surgeryDate)
  return {
    givenAt: input.givenAt,
    phase,
    component: input.component as Component,
    units: input.units,
    preTransfusionHbGL: input.preTransfusionHbGL ?? null,
    postTransfusionHbGL: input.postTransfusionHbGL ?? null,
    reassessedBeforeNext: input.reassessedBeforeNext,
    informationGiven: input.informationGiven,
    productCodes: [...(input.productCodes ?? [])],
    reason: input.reason ?? null,
    thresholdGL: threshold.thresholdGL,
    thresholdBasis: threshold.basis,
  }
}

export async function listTransfusions(viewer: Viewer, referralId: number): Promise<TransfusionList> {
  const r = await loadReferral(viewer, referralId)
  const rows = await Transfusion.findAll({
    where: { referralId },
    order: [
      ['givenAt', 'ASC'],
      ['id', 'ASC'],
    ],
  })
  // Not audited again here: the After surgery tab that lists them opens with the audited read of
  // the post-operative record (GET /outcome), and the list refetches after every write.
  return { transfusions: rows.map(toTransfusionView), threshold: thresholdOf(r), redCellUnits: await redCellUnitsByPhase(referralId) }
}

export async function recordTransfusion(
  sequelize: Sequelize,
  viewer: Viewer,
  referralId: number,
  input: TransfusionInput,
): Promise<TransfusionWrite> {
  return sequelize.transaction(async (t) => {
    const { r, outcome } = await lockForTransfusion(t, viewer, referralId)
    const threshold = thresholdOf(r)
    checkAgainstReferral(r, outcome, input, threshold)
    const row = await Transfusion.create(
      { referralId, ...valuesOf(input, outcome, threshold), recordedBy: viewer.userId },
      { transaction: t },
    )
    const redCellUnits = await syncOutcomeUnits(referralId, t)
    const view = toTransfusionView(row)
    await recordAudit(t, viewer, { action: 'create', entity: 'transfusion', entityId: row.id, patientId: r.patientId, after: view })
    return { transfusion: view, redCellUnits }
  })
}

async function standingRow(t: Transaction, referralId: number, transfusionId: number) {
  const row = await Transfusion.findOne({ where: { id: transfusionId, referralId }, transaction: t, lock: t.LOCK.UPDATE })
  if (!row) throw new NotFound('Transfusion')
  if (row.voidedAt) throw new RuleRefused('This transfusion was voided; record a new one instead', 'voided')
  return row
}

export async function editTransfusion(
  sequelize: Sequelize,
  viewer: Viewer,
  referralId: number,
  transfusionId: number,
  input: EditTransfusionInput,
): Promise<TransfusionWrite> {
  return sequelize.transaction(async (t) => {
    const { r, outcome } = await lockForTransfusion(t, viewer, referralId)
    const row = await standingRow(t, referralId, transfusionId)
    const threshold = thresholdOf(r)
    checkAgainstReferral(r, outcome, input, threshold)
    const before = toTransfusionView(row)
    await row.update(valuesOf(input, outcome, threshold), { transaction: t })
    const redCellUnits = await syncOutcomeUnits(referralId, t)
    const view = toTransfusionView(row)
    const diff = changedFields(before, view)
    await recordAudit(t, viewer, {
      action: 'update',
      entity: 'transfusion',
      entityId: row.id,
      patientId: r.patientId,
      before: diff.before,
      after: { ...diff.after, changeReason: input.changeReason },
    })
    return { transfusion: view, redCellUnits }
  })
}

export async function voidTransfusion(
  sequelize: Sequelize,
  viewer: Viewer,
  referralId: number,
  transfusionId: number,
  reason: string,
): Promise<TransfusionWrite> {
  return sequelize.transaction(async (t) => {
    const { r } = await lockForTransfusion(t, viewer, referralId)
    const row = await standingRow(t, referralId, transfusionId)
    await row.update({ voidedAt: new Date(), voidedBy: viewer.userId, voidReason: reason }, { transaction: t })
    const redCellUnits = await syncOutcomeUnits(referralId, t)
    const view = toTransfusionView(row)
    await recordAudit(t, viewer, {
      action: 'void',
      entity: 'transfusion',
      entityId: row.id,
      patientId: r.patientId,
      before: { voided: null },
      after: { voided: view.voided },
    })
    return { transfusion: view, redCellUnits }
  })
}
