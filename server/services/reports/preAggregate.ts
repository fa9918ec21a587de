import { QueryTypes, type Sequelize, type Transaction } from 'sequelize'
import { rawInTransaction } from '../rawTransaction'

/** Ids per statement: the IN list stays a small, fixed-size statement for an import of any size. */
const CHUNK = 1000

/**
 * The refresh both per-referral pre-aggregates share (episode_facts, referral_milestones): for each thousand of
 * the referrals (:ids), the upsert that writes their rows from the raw rows, then the delete of the rows that
 * should no longer be there, inside the writer's transaction.
 */
export async function refreshByReferral(
  sequelize: Sequelize,
  t: Transaction,
  referralIds: Iterable<number>,
  sql: { upsert: string; deleteStale: string },
): Promise<void> {
  const ids = [...new Set(referralIds)].filter((id) => Number.isSafeInteger(id) && id > 0)
  const upsert = withListPlaceholders(sql.upsert)
  const deleteStale = withListPlaceholders(sql.deleteStale)
  for (let i = 0; i < ids.length; i += CHUNK) {
    const chunk = ids.slice(i, i + CHUNK)
    await rawInTransaction(sequelize, t, upsert.sql, new Array<number[]>(upsert.lists).fill(chunk))
    await rawInTransaction(sequelize, t, deleteStale.sql, new Array<number[]>(deleteStale.lists).fill(chunk))
  }
}

/**
 * A refresh statement's `:ids` as `?`, sent through the driver on the transaction's connection (rawTransaction.ts):
 * the driver writes the list into the text as Sequelize's replacements did (the same statement reaches MariaDB),
 * without Sequelize's query path, which tokenised each statement's text and escaped every id again for each
 * thousand referrals. Kept per statement text (the refreshes' own, five; none has another `?`).
 */
const listPlaceholders = new Map<string, { sql: string; lists: number }>()
function withListPlaceholders(named: string): { sql: string; lists: number } {
  let hit = listPlaceholders.get(named)
  if (!hit) {
    const sql = named.replace(/:ids\b/g, '?')
    hit = { sql, lists: sql.split('?').length - 1 }
    listPlaceholders.set(named, hit)
  }
  return hit
}

/** Every row of `table` from scratch in one transaction (readers see the old table or the new one); its row count. */
export function rebuildTable(sequelize: Sequelize, table: string, rebuildSql: string): Promise<number> {
  return sequelize.transaction(async (t) => {
    await sequelize.query(`DELETE FROM ${table}`, { transaction: t })
    await sequelize.query(rebuildSql, { transaction: t })
    const [row] = await sequelize.query<{ n: unknown }>(`SELECT COUNT(*) AS n FROM ${table}`, { transaction: t, type: QueryTypes.SELECT })
    return Number(row?.n ?? 0)
  })
}
