import { QueryTypes, type QueryInterface } from 'sequelize'

/**
 * Sort keys for "lowest (or highest) Hb first, missing Hb last", kept by MariaDB itself so no
 * write path can forget them, and indexed with the date so the worklist pages by index.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  const q = (sql: string) => qi.sequelize.query(sql, { type: QueryTypes.RAW })
  await q(`ALTER TABLE referrals
    ADD COLUMN hb_sort_asc DOUBLE AS (COALESCE(latest_hb_gl, 1e9)) PERSISTENT,
    ADD COLUMN hb_sort_desc DOUBLE AS (COALESCE(-latest_hb_gl, 1e9)) PERSISTENT`)
  await qi.addIndex('referrals', ['hb_sort_asc', 'planned_surgery_date', 'id'], { name: 'referrals_hb_sort_asc' })
  await qi.addIndex('referrals', ['hb_sort_desc', 'planned_surgery_date', 'id'], { name: 'referrals_hb_sort_desc' })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeIndex('referrals', 'referrals_hb_sort_desc')
  await qi.removeIndex('referrals', 'referrals_hb_sort_asc')
  await qi.sequelize.query('ALTER TABLE referrals DROP COLUMN hb_sort_desc, DROP COLUMN hb_sort_asc', { type: QueryTypes.RAW })
}
