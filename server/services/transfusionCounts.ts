import { Op, type Transaction } from 'sequelize'
import { Outcome, Transfusion } from '../models/index'

/** Red-cell units of the episode's standing (not voided) transfusions, by phase. */
export async function redCellUnitsByPhase(referralId: number, t?: Transaction) {
  const rows = await Transfusion.findAll({
    where: { referralId, component: 'red-cells', voidedAt: { [Op.is]: null } },
    attributes: ['phase', 'units'],
    transaction: t,
  })
  const sum = (phase: string) => rows.filter((r) => r.phase === phase).reduce((s, r) => s + r.units, 0)
  return { beforeSurgery: sum('before-surgery'), duringSurgery: sum('during-surgery'), afterSurgery: sum('after-surgery') }
}

/**
 * The post-operative record's unit counts are derived from the transfusion rows; rewritten in
 * the same transaction as every transfusion write so the outcome reports never disagree.
 */
export async function syncOutcomeUnits(referralId: number, t: Transaction) {
  const counts = await redCellUnitsByPhase(referralId, t)
  await Outcome.update(
    { unitsTransfusedIntraOp: counts.duringSurgery, unitsTransfusedPostOp: counts.afterSurgery },
    { where: { referralId }, transaction: t },
  )
  return counts
}
