import { QueryTypes, type Sequelize, type Transaction } from 'sequelize'
import { responseFlags, type DoseGiven, type ResponseFlags } from '../../shared/clinic/responseFlags'
import type { MeasuredHb } from '../../shared/clinic/evidence'
import { rawInTransaction } from './rawTransaction'
import { screenableSql } from '../models/result'
import { worklistChanged } from './worklistCounts'
import { clinicTimeZone } from './clinicDay'

interface DoseRow extends DoseGiven {
  referralId: number
}
interface HbRow {
  referralId: number
  takenAt: Date | string
  hbGL: number
}

function groupBy<R extends { referralId: number }, T>(rows: readonly R[], map: (r: R) => T): Map<number, T[]> {
  const out = new Map<number, T[]>()
  for (const r of rows) {
    const list = out.get(r.referralId)
    if (list) list.push(map(r))
    else out.set(r.referralId, [map(r)])
  }
  return out
}

/** Each episode's IV-iron doses, oldest first (one statement for the whole list, through the driver). */
export async function dosesOf(sequelize: Sequelize, ids: readonly number[], t: Transaction): Promise<Map<number, DoseGiven[]>> {
  if (!ids.length) return new Map()
  const doses = await rawInTransaction<DoseRow[]>(
    sequelize,
    t,
    `SELECT a.referral_id AS referralId, a.given_at AS givenAt, a.dose_mg AS doseMg, p.route
     FROM administrations a JOIN prescriptions p ON p.id = a.prescription_id
     WHERE a.referral_id IN (${ids.map(() => '?').join(', ')}) ORDER BY a.referral_id, a.given_at, a.id`,
    ids,
  )
  return groupBy(doses, (d) => ({ givenAt: d.givenAt, doseMg: d.doseMg, route: d.route }))
}

/**
 * The two flags of one episode from its measured Hb (oldest first) and doses. An episode given no
 * iron has neither flag, so its Hb is not even needed (callers pass none, as the reads did).
 */
export function ironFlags(hb: readonly MeasuredHb[], doses: readonly DoseGiven[] | undefined): ResponseFlags {
  if (!doses?.length) return responseFlags([], [], clinicTimeZone())
  return responseFlags(hb, doses, clinicTimeZone())
}

/**
 * Keeps the two response flags on the referral row (no response to IV iron; Hb falling after
 * iron), so the worklist can filter and count them with an index like every other flag. They
 * follow from measured Hb and doses only (responseFlags in shared/clinic/responseFlags.ts, the
 * same rule the verdict uses), so they change only when a result or a dose is written: every such
 * write calls this (a dose) or rescreenReferrals (results, which sets them in its own UPDATE) in
 * its own transaction.
 */
export async function refreshIronResponse(
  sequelize: Sequelize,
  referralIds: readonly number[],
  t: Transaction,
  chunk = 500,
): Promise<void> {
  for (let i = 0; i < referralIds.length; i += chunk) {
    const ids = referralIds.slice(i, i + chunk)
    const dosesByReferral = await dosesOf(sequelize, ids, t)
    const treated = [...dosesByReferral.keys()]
    const hb = treated.length
      ? await sequelize.query<HbRow>(
          `SELECT referral_id AS referralId, taken_at AS takenAt, value_canonical AS hbGL FROM results
         WHERE referral_id IN (:treated) AND analyte = 'hb' AND ${screenableSql()} ORDER BY referral_id, taken_at, id`,
          { type: QueryTypes.SELECT, replacements: { treated }, transaction: t },
        )
      : []
    const noResponse: number[] = []
    const falling: number[] = []
    // Grouped once: filtering every row per episode was 500 × rows per chunk.
    const hbOf = groupBy(hb, (h) => ({ takenAt: h.takenAt, hbGL: Number(h.hbGL) }))
    for (const id of ids) {
      const f = ironFlags(hbOf.get(id) ?? [], dosesByReferral.get(id))
      if (f.noResponseToIron) noResponse.push(id)
      if (f.hbFallingAfterIron) falling.push(id)
    }
    // Derived data, not an edit: the version (the optimistic lock on decisions) stays. One UPDATE
    // for the chunk (0 is no referral's id: it stands for an empty list).
    worklistChanged('referral', t)
    await sequelize.query(
      'UPDATE referrals SET no_response_to_iron = id IN (:nr), hb_falling_after_iron = id IN (:fa) WHERE id IN (:ids)',
      {
        type: QueryTypes.UPDATE,
        replacements: { nr: noResponse.length ? noResponse : [0], fa: falling.length ? falling : [0], ids },
        transaction: t,
      },
    )
  }
}
