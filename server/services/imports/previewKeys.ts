import { QueryTypes, type Sequelize, type Transaction } from 'sequelize'
import type { MatchedRow } from './match'
import { rawInTransaction } from '../rawTransaction'

/**
 * A preview's accepted rows, by natural key only, in a temporary table of the run's own
 * connection: later chunks find their repeats in it as a commit finds them among the rows it has
 * inserted, while the preview writes nothing to results (seven indexes to insert into and undo
 * again at the rollback, more than half of a preview's MariaDB CPU at 100 000 rows). The keys stay
 * in MariaDB, so the server's memory stays flat however long the file.
 */
export const PREVIEW_KEYS = 'import_preview_keys'

export async function createPreviewKeys(sequelize: Sequelize, t: Transaction): Promise<void> {
  // A pooled connection may still hold one from a run that lost its connection's answer.
  await dropPreviewKeys(sequelize, t)
  await sequelize.query(
    `CREATE TEMPORARY TABLE ${PREVIEW_KEYS} (referral_id INT UNSIGNED NOT NULL, analyte VARCHAR(20) NOT NULL,
       taken_at DATETIME NOT NULL, value_canonical DOUBLE NOT NULL, KEY (referral_id, analyte, taken_at, value_canonical))`,
    { type: QueryTypes.RAW, transaction: t },
  )
}

export async function addPreviewKeys(sequelize: Sequelize, rows: readonly MatchedRow[], t: Transaction): Promise<void> {
  for (let i = 0; i < rows.length; i += 1000) {
    const part = rows.slice(i, i + 1000)
    await rawInTransaction(
      sequelize,
      t,
      `INSERT INTO ${PREVIEW_KEYS} VALUES ${part.map(() => '(?, ?, ?, ?)').join(', ')}`,
      part.flatMap((m) => [m.referralId, m.reading.analyte, m.takenAtUtc, m.reading.valueCanonical]),
    )
  }
}

export async function dropPreviewKeys(sequelize: Sequelize, t: Transaction): Promise<void> {
  await sequelize.query(`DROP TEMPORARY TABLE IF EXISTS ${PREVIEW_KEYS}`, { type: QueryTypes.RAW, transaction: t })
}
