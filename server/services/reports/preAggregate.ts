import { QueryTypes, type Sequelize, type Transaction } from 'sequelize'

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
  for (let i = 0; i < ids.length; i += CHUNK) {
    const replacements = { ids: ids.slice(i, i + CHUNK) }
    await sequelize.query(sql.upsert, { transaction: t, replacements, type: QueryTypes.INSERT })
    await sequelize.query(sql.deleteStale, { transaction: t, replacements, type: QueryTypes.DELETE })
  }
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
