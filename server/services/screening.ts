import { Op, QueryTypes, type Sequelize, type Transaction } from 'sequelize'
import { classifyAnaemia, IRON_STATUS_CRITERIA, type AnaemiaCriteria, type Sex } from '../../shared/clinical'
import {
  SCREENING_ANALYTES,
  ironStudiesFromRows,
  latestFromRows,
  screeningOutcome,
  type LatestValues,
  type ScreeningColumns,
} from '../../shared/clinic/screening'
import type { IronStudies } from '../../shared/clinic/ironStudies'
import { STAGE_LABELS } from '../../shared/pathway'
import { Referral, Result } from '../models/index'
import { screenableSql, SCREENABLE_WHERE } from '../models/result'
import { isoOrNull } from './viewer'
import { worklistChanged } from './worklistCounts'
import { refreshIronResponse } from './ironResponse'
import type { ScreeningView } from '../../shared/pathway/views'

/** Latest of each screening analyte on the episode (by time taken, then by entry). */
export async function latestValues(referralId: number, t?: Transaction): Promise<LatestValues> {
  return latestFromRows(await screeningRows(referralId, t))
}

/** The latest ferritin, TSAT and CRP with their sample times, for the verdict's age rule. */
export async function latestIronStudies(referralId: number, t?: Transaction): Promise<IronStudies> {
  return ironStudiesFromRows(await screeningRows(referralId, t))
}

async function screeningRows(referralId: number, t?: Transaction) {
  return Result.findAll({
    where: { referralId, analyte: { [Op.in]: [...SCREENING_ANALYTES] }, ...SCREENABLE_WHERE },
    order: [
      ['takenAt', 'DESC'],
      ['id', 'DESC'],
    ],
    attributes: ['analyte', 'valueCanonical', 'takenAt'],
    transaction: t,
    raw: true,
  })
}

/** Re-derives the outcome and stores it on the referral row (the worklist reads it from there). */
export async function refreshScreening(referral: Referral, sex: Sex, t: Transaction): Promise<ScreeningColumns> {
  const next = screeningOutcome(await latestValues(referral.id, t), sex, referral.anaemiaCriteria)
  // Derived data, not an edit: the referral's version (the optimistic lock on decisions) stays.
  worklistChanged('referral', t)
  await Referral.update(next, { where: { id: referral.id }, transaction: t })
  await refreshIronResponse(Referral.sequelize!, [referral.id], t)
  return next
}

export interface ReferralScreeningRow {
  id: number
  sex: Sex
  criteria: AnaemiaCriteria
}

/**
 * The same re-screening as refreshScreening, for many referrals at once (a laboratory import):
 * the latest values come from one query per chunk and one UPDATE writes the outcomes, so a
 * 100 000-row file does not cost two round trips per episode. Same rules, same columns.
 */
export async function refreshScreeningMany(
  sequelize: Sequelize,
  referralIds: readonly number[],
  t: Transaction,
  chunk = 500,
): Promise<number> {
  let updated = 0
  for (let i = 0; i < referralIds.length; i += chunk) {
    const ids = referralIds.slice(i, i + chunk)
    const refs = await sequelize.query<ReferralScreeningRow>(
      `SELECT r.id, p.sex, r.anaemia_criteria AS criteria FROM referrals r JOIN patients p ON p.id = r.patient_id WHERE r.id IN (:ids)`,
      { type: QueryTypes.SELECT, replacements: { ids }, transaction: t },
    )
    updated += (await rescreenReferrals(sequelize, refs, t)).size
  }
  return updated
}

/**
 * refreshScreeningMany for referrals whose sex and criteria the caller has already read (the HL7
 * batch path reads them with its lock): the latest values in one query, the outcomes in one
 * UPDATE, the iron-response flags once; returns each referral's new screening columns.
 */
export async function rescreenReferrals(
  sequelize: Sequelize,
  refs: readonly ReferralScreeningRow[],
  t: Transaction,
): Promise<Map<number, ScreeningColumns>> {
  const out = new Map<number, ScreeningColumns>()
  if (!refs.length) return out
  const ids = refs.map((r) => r.id)
  const rows = await sequelize.query<{ referralId: number; analyte: string; valueCanonical: number; takenAt: Date }>(
    `SELECT referral_id AS referralId, analyte, value_canonical AS valueCanonical, taken_at AS takenAt FROM results
     WHERE referral_id IN (:ids) AND analyte IN (:analytes) AND ${screenableSql()} ORDER BY referral_id, taken_at DESC, id DESC`,
    { type: QueryTypes.SELECT, replacements: { ids, analytes: [...SCREENING_ANALYTES] }, transaction: t },
  )
  const byReferral = new Map<number, typeof rows>()
  for (const r of rows) {
    const list = byReferral.get(r.referralId) ?? []
    list.push(r)
    byReferral.set(r.referralId, list)
  }
  const values: unknown[] = []
  const selects = refs.map((ref) => {
    const next = screeningOutcome(latestFromRows(byReferral.get(ref.id) ?? []), ref.sex, ref.criteria)
    out.set(ref.id, next)
    values.push(
      ref.id,
      next.anaemic == null ? null : next.anaemic ? 1 : 0,
      next.anaemiaSeverity,
      next.ironStatus,
      next.proposedStage,
      next.latestHbGL,
      next.latestHbAt,
    )
    return (
      'SELECT CAST(? AS UNSIGNED) AS id, CAST(? AS SIGNED) AS anaemic, CAST(? AS CHAR(10)) AS sev, CAST(? AS CHAR(20)) AS iron, ' +
      'CAST(? AS CHAR(12)) AS prop, CAST(? AS DOUBLE) AS hb, CAST(? AS DATETIME) AS hb_at'
    )
  })
  // Derived data, not an edit: the version (the optimistic lock on decisions) stays, as above.
  worklistChanged('referral', t)
  await sequelize.query(
    `UPDATE referrals r JOIN (${selects.join(' UNION ALL ')}) v ON v.id = r.id
     SET r.anaemic = v.anaemic, r.anaemia_severity = v.sev, r.iron_status = v.iron, r.proposed_stage = v.prop,
         r.latest_hb_gl = v.hb, r.latest_hb_at = v.hb_at, r.updated_at = ?`,
    { type: QueryTypes.UPDATE, replacements: [...values, new Date()], transaction: t },
  )
  await refreshIronResponse(sequelize, ids, t)
  return out
}

/** What screeningView reads of a referral: its screening columns and criteria (a model or a plain row). */
export type ScreenedReferral = Pick<
  Referral,
  'anaemic' | 'anaemiaSeverity' | 'ironStatus' | 'proposedStage' | 'anaemiaCriteria' | 'latestHbGL' | 'latestHbAt'
>

export function screeningView(r: ScreenedReferral, sex: Sex): ScreeningView {
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
