import type { QueryInterface } from 'sequelize'

/**
 * Issue #19, reports at 25 000 referrals (EXPLAIN ANALYZE on the bench database, see the README's
 * performance notes):
 * - The funnel and waiting times read each referral of the period (created_at range) for its
 *   procedure, surgeon, anaemia, iron status and planned date. Through `referrals_created_at` (or the
 *   procedure index the optimizer preferred) that was one full-row read per referral: 40 of MariaDB's
 *   ms for counting the referrals alone, 10 ms from this covering index. `referrals_created_at` is its
 *   prefix and goes, so writes to referrals keep the same number of indexes.
 * - The grouped pass for each referral's first and last Hb read every result of every analyte
 *   (250 000 index entries, 40 % of them Hb) because the index began with referral_id. With the
 *   analyte first it reads the Hb entries only (100 ms → 33 ms of MariaDB CPU for that pass). The
 *   per-episode lookups of 0024 (referral and analyte both equal, then time, id) use this index as well
 *   as they used 0024's, which it replaces: still one such index on results, so imports pay no more.
 */
const REFERRALS = 'referrals_report_period'
const RESULTS = 'results_final_by_analyte'

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addIndex('referrals', ['created_at', 'procedure_id', 'surgeon_id', 'anaemic', 'iron_status', 'planned_surgery_date'], {
    name: REFERRALS,
  })
  await qi.removeIndex('referrals', 'referrals_created_at')
  await qi.addIndex('results', ['analyte', 'referral_id', 'taken_at', 'id', 'voided_at', 'status', 'value_canonical'], { name: RESULTS })
  await qi.removeIndex('results', 'results_final_by_referral')
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addIndex('results', ['referral_id', 'analyte', 'taken_at', 'id', 'voided_at', 'status', 'value_canonical'], {
    name: 'results_final_by_referral',
  })
  await qi.removeIndex('results', RESULTS)
  await qi.addIndex('referrals', ['created_at'], { name: 'referrals_created_at' })
  await qi.removeIndex('referrals', REFERRALS)
}
