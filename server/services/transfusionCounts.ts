import { Op, type Transaction } from 'sequelize'
import { Outcome, Transfusion } from '../models/index'
import { refreshEpisodeFacts } from './reports/episodeFacts'

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
 * the same transaction as every transfusion write (record, correct, void) so the outcome reports
 * never disagree, and so are the quality report's transfusion facts (episode_facts).
 */
export async function syncOutcomeUnits(referralId: number, t: Transaction) {
  const counts = await redCellUnitsByPhase(referralId, t)
  await Outcome.update(
    { unitsTransfusedIntraOp: counts.duringSurgery, unitsTransfusedPostOp: counts.afterSurgery },
    { where: { referralId }, transaction: t },
  )
  await refreshEpisodeFacts(t, [referralId])
  return counts
}
