import { QueryTypes, type Sequelize, type Transaction } from 'sequelize'
import { Outcome } from '../../models/index'
import { DELETE_SQL, REBUILD_SQL, UPSERT_SQL } from './episodeFactsSql'

/** Ids per statement: the IN list stays a small, fixed-size statement for an import of any size. */
const CHUNK = 1000

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
export async function refreshEpisodeFacts(t: Transaction, referralIds: Iterable<number>): Promise<void> {
  const ids = [...new Set(referralIds)].filter((id) => Number.isSafeInteger(id) && id > 0)
  if (ids.length === 0) return
  const sequelize = Outcome.sequelize!
  for (let i = 0; i < ids.length; i += CHUNK) {
    const replacements = { ids: ids.slice(i, i + CHUNK) }
    await sequelize.query(UPSERT_SQL, { transaction: t, replacements, type: QueryTypes.INSERT })
    await sequelize.query(DELETE_SQL, { transaction: t, replacements, type: QueryTypes.DELETE })
  }
}

/**
 * Every row from scratch, deterministically (the migration runs it; ops run `npm run db:episode-facts`
 * after writing to the tables by hand). One transaction: readers see the old table or the new one.
 */
export async function rebuildEpisodeFacts(sequelize: Sequelize): Promise<number> {
  return sequelize.transaction(async (t) => {
    await sequelize.query('DELETE FROM episode_facts', { transaction: t })
    await sequelize.query(REBUILD_SQL, { transaction: t })
    const [row] = await sequelize.query<{ n: unknown }>('SELECT COUNT(*) AS n FROM episode_facts', {
      transaction: t,
      type: QueryTypes.SELECT,
    })
    return Number(row?.n ?? 0)
  })
}
