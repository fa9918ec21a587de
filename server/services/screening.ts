import { Op, type Transaction } from 'sequelize'
import {
  classifyAnaemia,
  classifyIronStatus,
  isIronDeficient,
  IRON_STATUS_CRITERIA,
  type AnaemiaCriteria,
  type AnaemiaSeverity,
  type IronStatus,
  type Sex,
} from '../../shared/clinical'
import { STAGE_LABELS, type Stage } from '../../shared/pathway'
import { Referral, Result } from '../models/index'
import { isoOrNull } from './viewer'

export interface ScreeningColumns {
  anaemic: boolean | null
  anaemiaSeverity: AnaemiaSeverity | null
  ironStatus: IronStatus | null
  proposedStage: Stage | null
  latestHbGL: number | null
  latestHbAt: Date | null
}

export interface LatestValues {
  hb?: { value: number; takenAt: Date }
  ferritin?: number
  tsat?: number
  crp?: number
}

/**
 * The screening outcome from the latest values on the episode, by the clinic's criteria.
 * Proposal: fit for theatre when neither anaemic nor iron deficient; clinic otherwise —
 * including an 'indeterminate' iron status (ferritin ≥ 30 without TSAT), because a functional
 * deficiency has not been excluded. Without an Hb, or without a ferritin in a non-anaemic
 * patient, the screen is incomplete and nothing is proposed.
 */
export function screeningOutcome(v: LatestValues, sex: Sex, criteria: AnaemiaCriteria): ScreeningColumns {
  const anaemia = v.hb ? classifyAnaemia({ hbGL: v.hb.value, sex, criteria }) : null
  const ironStatus = v.ferritin !== undefined ? classifyIronStatus({ ferritinUgL: v.ferritin, tsatPct: v.tsat, crpMgL: v.crp }) : null
  let proposedStage: Stage | null = null
  if (anaemia?.anaemic || (ironStatus && isIronDeficient(ironStatus))) proposedStage = 'clinic'
  else if (anaemia && ironStatus === 'replete') proposedStage = 'cleared'
  else if (anaemia && ironStatus === 'indeterminate') proposedStage = 'clinic'
  return {
    anaemic: anaemia ? anaemia.anaemic : null,
    anaemiaSeverity: anaemia ? anaemia.severity : null,
    ironStatus,
    proposedStage,
    latestHbGL: v.hb?.value ?? null,
    latestHbAt: v.hb?.takenAt ?? null,
  }
}

/** Latest of each screening analyte on the episode (by time taken, then by entry). */
export async function latestValues(referralId: number, t?: Transaction): Promise<LatestValues> {
  const rows = await Result.findAll({
    where: { referralId, analyte: { [Op.in]: ['hb', 'ferritin', 'tsat', 'crp'] } },
    order: [['takenAt', 'DESC'], ['id', 'DESC']],
    attributes: ['analyte', 'valueCanonical', 'takenAt'],
    transaction: t,
    raw: true,
  })
  const out: LatestValues = {}
  for (const r of rows) {
    if (r.analyte === 'hb') out.hb ??= { value: r.valueCanonical, takenAt: r.takenAt }
    else if (r.analyte === 'ferritin' || r.analyte === 'tsat' || r.analyte === 'crp') out[r.analyte] ??= r.valueCanonical
  }
  return out
}

/** Re-derives the outcome and stores it on the referral row (the worklist reads it from there). */
export async function refreshScreening(referral: Referral, sex: Sex, t: Transaction): Promise<ScreeningColumns> {
  const next = screeningOutcome(await latestValues(referral.id, t), sex, referral.anaemiaCriteria)
  // Derived data, not an edit: the referral's version (the optimistic lock on decisions) stays.
  await Referral.update(next, { where: { id: referral.id }, transaction: t })
  return next
}

export function screeningView(r: Referral, sex: Sex) {
  // The threshold depends only on criteria and sex; 130 stands in when no Hb exists yet.
  const rule = classifyAnaemia({ hbGL: r.latestHbGL ?? 130, sex, criteria: r.anaemiaCriteria })
  return {
    anaemic: r.anaemic == null ? null : Boolean(r.anaemic),
    severity: r.anaemiaSeverity,
    ironStatus: r.ironStatus,
    proposedStage: r.proposedStage,
    proposedStageLabel: r.proposedStage ? STAGE_LABELS[r.proposedStage] : null,
    criteria: r.anaemiaCriteria,
    thresholdGL: rule.thresholdGL,
    basis: rule.basis,
    ironCriteria: IRON_STATUS_CRITERIA,
    latestHbGL: r.latestHbGL,
    latestHbAt: isoOrNull(r.latestHbAt),
  }
}
