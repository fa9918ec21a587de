import { QueryTypes, type Sequelize, type Transaction } from 'sequelize'
import { Referral } from '../../models/index'
import { DELETE_EMPTY_SQL, REBUILD_SQL, UPSERT_HB_SQL, UPSERT_SQL } from './milestonesSql'
import { rebuildTable, refreshByReferral } from './preAggregate'

const refresh = (t: Transaction, referralIds: Iterable<number>, upsert: string) =>
  refreshByReferral(Referral.sequelize!, t, referralIds, { upsert, deleteStale: DELETE_EMPTY_SQL })

/**
 * Issue #19: brings `referral_milestones` (migration 0027, milestonesSql.ts) up to date for these referrals,
 * inside the writer's transaction, so the funnel and the waiting times never see a change without its
 * milestones. Called once per unit of work with the referrals it touched by every writer of doses,
 * prescriptions, post-operative records and stage moves (no row triggers: an import pays two statements per
 * thousand episodes, not one per row). As for episode_facts (episodeFacts.ts), INSERT … SELECT reads the
 * child rows with InnoDB's locking read, so of two writers to one episode the later one's refresh sees the
 * earlier one's committed rows.
 */
export function refreshMilestones(t: Transaction, referralIds: Iterable<number>): Promise<void> {
  return refresh(t, referralIds, UPSERT_SQL)
}

/**
 * The same for writers that change results only (typed results, CSV and FHIR imports and their reversal, HL7):
 * only the first and last counted Hb are recomputed, the cheaper statement for an import of every episode.
 */
export function refreshHbMilestones(t: Transaction, referralIds: Iterable<number>): Promise<void> {
  return refresh(t, referralIds, UPSERT_HB_SQL)
}

/**
 * Every row from scratch, deterministically (migration 0027; `npm run db:episode-facts` after writing to the
 * tables by hand; the demo seed; the bench). One transaction: readers see the old table or the new one.
 * Then the table's statistics: with those of the empty table the refresh's DELETE read the whole table for each
 * thousand ids instead of their primary keys (measured on the bench database: 360 against 45 ms of MariaDB CPU
 * for all 25 000 referrals).
 */
export async function rebuildMilestones(sequelize: Sequelize): Promise<number> {
  const n = await rebuildTable(sequelize, 'referral_milestones', REBUILD_SQL)
  await sequelize.query('ANALYZE TABLE referral_milestones', { type: QueryTypes.SELECT })
  return n
}
