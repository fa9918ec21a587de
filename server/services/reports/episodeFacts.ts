import type { Sequelize, Transaction } from 'sequelize'
import { Outcome } from '../../models/index'
import { DELETE_SQL, REBUILD_SQL, UPSERT_SQL } from './episodeFactsSql'
import { rebuildTable, refreshByReferral } from './preAggregate'

/**
 * Issue #19 point 4: brings `episode_facts` (migration 0026) up to date for these referrals, inside the
 * writer's transaction, so the quality report never sees a change without its facts. Every unit of work
 * that writes an outcome, a result, a dose, a prescription, a transfusion or a surgery-date change calls
 * it once with the referrals it touched (no row triggers: an import pays one statement per thousand
 * episodes, not one per row). Referrals without an outcome produce no row (and lose theirs).
 * In REPEATABLE READ (the default here) INSERT … SELECT reads the child rows with InnoDB's locking read (the
 * newest committed rows, not the transaction's snapshot) and locks the fact row, so of two writers to one
 * episode the later one's refresh sees the earlier one's committed rows.
 */
export function refreshEpisodeFacts(t: Transaction, referralIds: Iterable<number>): Promise<void> {
  return refreshByReferral(Outcome.sequelize!, t, referralIds, { upsert: UPSERT_SQL, deleteStale: DELETE_SQL })
}

/**
 * Every row from scratch, deterministically (the migration runs it; ops run `npm run db:episode-facts`
 * after writing to the tables by hand). One transaction: readers see the old table or the new one.
 */
export function rebuildEpisodeFacts(sequelize: Sequelize): Promise<number> {
  return rebuildTable(sequelize, 'episode_facts', REBUILD_SQL)
}
